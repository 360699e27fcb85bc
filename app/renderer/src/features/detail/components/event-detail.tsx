/** One event opened from the grid: header facts, then the burst or the clip view. */
import type { ClassifierOpinion, Decision, EventDetail } from '../../../../../../src/shared/review-api';
import type { Action } from '../../../shared/keys';
import { DECISION_LABEL, VERDICT_LABEL, shortTime } from '../../../shared/format';
import { useEventDetail } from '../hooks/use-event-detail';
import { BurstView } from './burst-view';
import { ClipView } from './clip-view';
import { EventProblems, type Problem } from '../../../shared/camera-problems';

interface Props {
  id: string;
  heat: boolean;
  position: string;
  /** The decision as the grid knows it now (it changes while the event is open). */
  decision: Decision | null | undefined;
  /** Camera problems of every deployment; those that concern this trigger are shown. */
  problems: readonly Problem[];
  bindActions(fn: ((a: Action) => boolean) | null): void;
  /** The same actions as the keys, for a mouse (the audit view has its own yes/no). */
  onAct?(a: Action): void;
}

export function EventDetailView({ id, heat, position, decision: current, problems, bindActions, onAct }: Props) {
  const { event, error } = useEventDetail(id);
  if (error) return <div className="detail detail-error">This event could not be loaded: {error}</div>;
  if (!event) return <div className="detail detail-loading">Loading…</div>;
  const decision = current !== undefined ? current : event.decision;
  return (
    <div className="detail" data-testid="detail" data-event={event.id} data-kind={event.kind}>
      <div className="detail-head">
        <span className="detail-position">{position}</span>
        <span className={`verdict-word verdict-${event.verdict}`}>{VERDICT_LABEL[event.verdict]}</span>
        <span>score {event.score.toFixed(3)}</span>
        <span data-testid="detail-decision" className={decision ? `decision-${decision}` : ''}>{decision ? DECISION_LABEL[decision] : 'undecided'}</span>
        <span>{event.deployment}</span>
        <span>{shortTime(event.start)}</span>
        <span className="card-dim">engine {event.engine_version}</span>
        {onAct && (
          <span className="detail-actions">
            <button type="button" onClick={() => onAct('keep')}>
              Keep <kbd>k</kbd>
            </button>
            <button type="button" onClick={() => onAct('set-aside')}>
              Set aside <kbd>s</kbd>
            </button>
            <button type="button" onClick={() => onAct('undo')}>
              Undo <kbd>u</kbd>
            </button>
          </span>
        )}
      </div>
      <RuleNote event={event} />
      <EventProblems problems={problems.filter((p) => p.eventIds.includes(event.id))} />
      {event.kind === 'clip' ? <ClipView key={event.id} event={event} bindActions={bindActions} /> : <BurstView key={event.id} event={event} heat={heat} bindActions={bindActions} />}
    </div>
  );
}

/** Which rule decided the verdict, said plainly (kernels/deployment-calibration.ts). A call the
 *  deployment's own statistics made, not the fitted model, is marked for a look before it is
 *  set aside: low-scoring animals fall in the same band of scores. */
function RuleNote({ event }: { event: EventDetail }) {
  const c = event.calibration;
  const t = (v: number) => v.toFixed(3);
  let text: string;
  const second = (event.features as { classifier?: ClassifierOpinion } | null)?.classifier;
  if (event.rule === 'classifier' && second) {
    text = `Likely blank by the change classifier's second opinion: motion alone said ${second.motionVerdict} (score ${t(event.score)}), and nothing among the strongest changes looked like a subject to ${second.model} (${t(second.score)}, below ${t(second.rule.classifierBlank)}). The classifier was trained on generated scenes only: look before setting it aside.`;
  } else if (event.rule === 'learned') {
    text = event.verdict === 'likely-blank'
      ? "Likely blank by the model learned from this deployment's reviewed triggers (movesift learn): it scores well below every trigger people kept here. That model learned from this place's decisions only: look before setting it aside."
      : "Not likely-blank: the model learned from this deployment's reviewed triggers (movesift learn) scores it like the triggers people kept here.";
  } else if (!c) {
    return null;
  } else if (event.rule === 'deployment') {
    text = `Likely blank by this deployment's own calibration: here, scores below ${t(c.cut)} are what its usual false triggers score (the fitted model alone calls blank below ${t(c.fittedBlank)}). An animal that scored low can hide in this band: look before setting it aside.`;
  } else if (c.status === 'off') text = `Decided by the fitted model (blank below ${t(c.fittedBlank)}).`;
  else if (c.status === 'labels') text = `Decided by the label calibration made from people's decisions (blank below ${t(c.cut)}).`;
  else if (c.status === 'too-few') text = `Decided by the fitted model (blank below ${t(c.fittedBlank)}): ${c.usable} trigger(s) of this deployment are too few for a calibration of its own.`;
  else if (c.status === 'busy') text = `Decided by the fitted model (blank below ${t(c.fittedBlank)}): most of this deployment's triggers score as animals do, so its own calibration steps back.`;
  else if (c.cut > c.fittedBlank) text = `Decided by the fitted model (blank below ${t(c.fittedBlank)}); this deployment's own calibration (blank below ${t(c.cut)}) did not change it.`;
  else text = `Decided by the fitted model (blank below ${t(c.fittedBlank)}); this deployment's own triggers gave no reason to move it.`;
  return (
    <div className={`rule-note${event.rule !== 'model' ? ' rule-deployment' : ''}`} data-testid="rule-note" data-rule={event.rule}>
      {text}
    </div>
  );
}
