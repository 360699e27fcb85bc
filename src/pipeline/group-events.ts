/**
 * Groups a deployment's images into trigger events: sorted by capture time then name, a new
 * event starts when the gap to the previous image exceeds `gapS`, or when an event already
 * holds `maxFrames` images (a camera re-triggering on wind for an hour would otherwise make one
 * event of thousands of frames; review and the temporal median both want bursts). Each video is
 * its own event. Pure: no I/O.
 */
export interface GroupItem {
  mediaId: number;
  rel: string;
  kind: 'image' | 'video';
  sortMs: number;
}

export interface Group {
  kind: 'burst' | 'single' | 'clip';
  items: GroupItem[];
}

export const DEFAULT_EVENT_GAP_S = 5;
export const MAX_EVENT_FRAMES = 20;

const byTimeThenName = (a: GroupItem, b: GroupItem): number => a.sortMs - b.sortMs || (a.rel < b.rel ? -1 : a.rel > b.rel ? 1 : 0);

export function groupEvents(items: readonly GroupItem[], gapS = DEFAULT_EVENT_GAP_S, maxFrames = MAX_EVENT_FRAMES): Group[] {
  const sorted = [...items].sort(byTimeThenName);
  const groups: Group[] = [];
  let current: GroupItem[] = [];
  const flush = (): void => {
    if (current.length) groups.push({ kind: current.length === 1 ? 'single' : 'burst', items: current });
    current = [];
  };
  for (const it of sorted) {
    if (it.kind === 'video') {
      groups.push({ kind: 'clip', items: [it] });
      continue;
    }
    const last = current[current.length - 1];
    if (last && (it.sortMs - last.sortMs > gapS * 1000 || current.length >= maxFrames)) flush();
    current.push(it);
  }
  flush();
  return groups.sort((a, b) => byTimeThenName(a.items[0], b.items[0]));
}
