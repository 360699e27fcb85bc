/** What the grid shows: the filters and the order, as the person set them with keys. */
import type { Decision, Light, Verdict } from '../../../../src/shared/review-api';

export interface ViewFilter {
  verdict?: Verdict;
  decision?: Decision | 'none';
  light?: Light;
  deployment?: string;
  /** Show events scored at least / at most these (stepped by keys); undefined: no bound. */
  scoreMin?: number;
  scoreMax?: number;
  sort: 'time' | 'score';
  desc: boolean;
}

export const DEFAULT_FILTER: ViewFilter = { sort: 'time', desc: false };

export const filterKey = (f: ViewFilter): string => JSON.stringify([f.verdict, f.decision, f.light, f.deployment, f.scoreMin, f.scoreMax, f.sort, f.desc]);

/** The next value in a fixed cycle (undefined = "any"). */
export function cycle<T>(values: readonly (T | undefined)[], current: T | undefined): T | undefined {
  return values[(values.indexOf(current) + 1) % values.length];
}

export const DECISION_CYCLE = [undefined, 'none', 'keep', 'set-aside'] as const;
export const LIGHT_CYCLE = [undefined, 'colour', 'infrared'] as const;
