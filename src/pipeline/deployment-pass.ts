/**
 * The scan's second pass, per deployment and light mode: what one event cannot know about its
 * camera. Today that is the deployment's own calibration (kernels/deployment-calibration.ts):
 * the bulk of its event scores, and a blank cut raised to it where the premise holds; where the
 * scan had a change classifier, its call stands on top (classifier/combine.ts), and a model
 * learned from the deployment's own decisions over both (classifier/learned-model.ts). It reads
 * only what pass one stored (scores and contexts), so it is cheap, runs after every scan over
 * every deployment the scan touched, and is idempotent: run again, it changes nothing; after a
 * new card, only the verdicts the new statistics move change. A scan killed before it leaves
 * the fitted model's verdicts, which are the safe side (the pass only ever adds likely-blank
 * calls, each marked as the deployment's).
 */
import type { Ledger } from '../ledger/open-ledger.js';
import { createDeploymentPassStore, type CalibrationRow } from '../ledger/deployment-pass-store.js';
import { calibrateDeployment, deploymentVerdict, MIN_USABLE } from '../kernels/deployment-calibration.js';
import { MOTION_MODEL } from '../kernels/model.js';
import { FEATURE_NAMES, type BlankGuard, type VerdictName } from '../kernels/score.js';
import { createLearnedStore } from '../ledger/learned-store.js';
import { learnedVerdict, storedRow, type LearnedModel } from '../classifier/learned-model.js';
import { joinedVerdict, type CombineRule } from '../classifier/combine.js';
import { ENGINE_VERSION } from './engine-version.js';

export interface PassResult {
  rows: CalibrationRow[];
  /** Verdicts (or the rule behind them) that changed. */
  changed: number;
}

const LIGHT_WORD: Record<string, string> = { colour: 'colour', infrared: 'infrared', unknown: 'light unknown' };

/** One line a person can act on, for a deployment whose calibration was not applied. */
export function calibrationNote(r: CalibrationRow): string | undefined {
  const where = `${r.deployment} (${LIGHT_WORD[r.light] ?? r.light})`;
  if (r.status === 'too-few') return `${where}: ${r.usable} event(s) with a background and any motion, too few (${MIN_USABLE} needed) for its own calibration; the fitted threshold is used`;
  if (r.status === 'off') return undefined;
  if (r.status === 'labels') return `${where}: people's label calibration is in force (blank below ${r.cut.toFixed(3)}); its own calibration is not applied`;
  if (r.status === 'busy') return `${where}: most of its events score as animals do (a busy place), so its own calibration steps back and the fitted threshold is used`;
  return undefined;
}

/** `raise`: let a deployment's own calibration raise its cut (scan --deployment-cut); without
 *  it the statistics are recorded (status `off`) and the fitted threshold decides. */
export function deploymentPass(db: Ledger, deployments: readonly string[], o: { raise: boolean }): PassResult {
  const store = createDeploymentPassStore(db);
  // People's label calibration, where one was applied, measured recall on this ledger's own
  // animals: it decides, and the unlabelled estimate is kept only for the record.
  const labelled = store.labelThreshold();
  const blank = labelled ?? MOTION_MODEL.thresholds.blank;
  const thresholds = { blank, motion: Math.max(blank, MOTION_MODEL.thresholds.motion) };
  const out: PassResult = { rows: [], changed: 0 };
  const learnedStore = createLearnedStore(db);
  for (const dep of deployments) {
    const kept = learnedStore.active(dep);
    const learned = kept ? (JSON.parse(kept.model) as LearnedModel) : undefined;
    const events = store.events(dep).map((e) => ({ ...e, guard: (e.context ? JSON.parse(e.context) : {}) as BlankGuard }));
    const byLight = new Map<string, typeof events>();
    for (const e of events) {
      const k = e.light ?? 'unknown';
      byLight.set(k, [...(byLight.get(k) ?? []), e]);
    }
    const rows: CalibrationRow[] = [];
    const verdicts: Array<{ id: string; verdict: string; rule: string }> = [];
    for (const [light, same] of byLight) {
      const estimate = calibrateDeployment(same, thresholds.blank);
      const c =
        labelled !== undefined ? { ...estimate, status: 'labels' as const, cut: labelled }
        : !o.raise ? { ...estimate, status: 'off' as const, cut: thresholds.blank }
        : estimate;
      rows.push({ deployment: dep, light, fittedBlank: thresholds.blank, engineVersion: ENGINE_VERSION, ...c });
      for (const e of same) {
        if (e.decided) continue;
        const v = deploymentVerdict(thresholds, c.cut, e.score, e.guard);
        // The classifier's call, where the scan had one, stands on top of either rule (classifier/combine.ts).
        const second = e.classifier ? (JSON.parse(e.classifier) as { score: number; rule: CombineRule }) : undefined;
        const joined = second ? joinedVerdict(second.rule, v.verdict as VerdictName, e.score, second.score, e.guard) : undefined;
        let call: { verdict: string; rule: string } = joined?.drivenBy === 'classifier' ? { verdict: joined.verdict, rule: 'classifier' } : v;
        // A model learned from this deployment's own decisions decides over both (classifier/learned-model.ts).
        if (learned) {
          const row = storedRow(learned, FEATURE_NAMES.length, e.score, e.best ? (JSON.parse(e.best) as number[]) : null, second?.score);
          const l = learnedVerdict(learned, row, call.verdict as VerdictName, !!(e.guard.noBackground ?? e.guard.noReference));
          if (l.changed) call = { verdict: l.verdict, rule: 'learned' };
        }
        verdicts.push({ id: e.id, ...call });
      }
    }
    out.changed += store.settle(dep, rows, verdicts);
    out.rows.push(...rows);
  }
  return out;
}
