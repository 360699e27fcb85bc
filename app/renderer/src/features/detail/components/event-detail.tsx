/** One event opened from the grid: header facts, then the burst or the clip view. */
import type { Decision } from '../../../../../../src/shared/review-api';
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
}

export function EventDetailView({ id, heat, position, decision: current, problems, bindActions }: Props) {
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
      </div>
      <EventProblems problems={problems.filter((p) => p.eventIds.includes(event.id))} />
      {event.kind === 'clip' ? <ClipView key={event.id} event={event} bindActions={bindActions} /> : <BurstView key={event.id} event={event} heat={heat} bindActions={bindActions} />}
    </div>
  );
}
