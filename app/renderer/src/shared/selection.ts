/**
 * The selected events and how many of each verdict they hold, so a set-aside can say plainly
 * what it would touch before it touches it, even when the selection is "all 40,000 shown".
 */
import type { Verdict } from '../../../../src/shared/review-api';

export interface Selection {
  ids: ReadonlySet<string>;
  verdicts: Readonly<Record<Verdict, number>>;
}

const NONE: Record<Verdict, number> = { 'likely-blank': 0, unsure: 0, motion: 0 };
export const EMPTY_SELECTION: Selection = { ids: new Set(), verdicts: NONE };

export function toggle(s: Selection, id: string, verdict: Verdict, on?: boolean): Selection {
  const has = s.ids.has(id);
  const want = on ?? !has;
  if (want === has) return s;
  const ids = new Set(s.ids);
  const verdicts = { ...s.verdicts };
  if (want) (ids.add(id), verdicts[verdict]++);
  else (ids.delete(id), verdicts[verdict]--);
  return { ids, verdicts };
}

export function fromServer(ids: string[], counts: Record<string, number>): Selection {
  return { ids: new Set(ids), verdicts: { 'likely-blank': counts['likely-blank'] ?? 0, unsure: counts.unsure ?? 0, motion: counts.motion ?? 0 } };
}
