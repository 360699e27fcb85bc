/**
 * Every key the app answers, in one table: the dispatcher looks actions up here and the help
 * overlay lists it, so the two can never disagree. Our own layout, chosen for one hand on the
 * letters and one on the arrows: decisions are k (keep) and s (set aside) wherever an event is
 * in view, u undoes, digits pick a verdict, and arrows always move.
 */
export type Mode = 'grid' | 'detail' | 'confirm' | 'help' | 'start' | 'audit' | 'act';

export type Action =
  | 'move-left' | 'move-right' | 'move-up' | 'move-down' | 'move-first' | 'move-last' | 'page-up' | 'page-down'
  | 'toggle-select' | 'extend-left' | 'extend-right' | 'extend-up' | 'extend-down' | 'select-shown' | 'clear-selection'
  | 'keep' | 'set-aside' | 'undo' | 'open'
  | 'verdict-blank' | 'verdict-unsure' | 'verdict-motion' | 'verdict-any'
  | 'cycle-decision' | 'cycle-light' | 'cycle-deployment' | 'score-lower' | 'score-raise' | 'floor-lower' | 'floor-raise' | 'toggle-order' | 'reverse-order'
  | 'toggle-heat' | 'help' | 'close' | 'start-screen'
  | 'frame-prev' | 'frame-next' | 'event-prev' | 'event-next' | 'window-prev' | 'window-next' | 'play-pause'
  | 'confirm-yes' | 'confirm-no'
  | 'audit-mode' | 'act-mode' | 'audit-yes' | 'audit-no';

export interface KeyBinding {
  modes: Mode[];
  /** KeyboardEvent.key values, with "Shift+" for shifted non-character keys. */
  keys: string[];
  action: Action;
  text: string;
}

export const KEYS: readonly KeyBinding[] = [
  { modes: ['grid'], keys: ['ArrowLeft', 'ArrowRight', 'ArrowUp', 'ArrowDown'], action: 'move-left', text: 'move between events' },
  { modes: ['grid'], keys: ['Home', 'End'], action: 'move-first', text: 'first / last event shown' },
  { modes: ['grid'], keys: ['PageUp', 'PageDown'], action: 'page-up', text: 'a screen up / down' },
  { modes: ['grid'], keys: [' '], action: 'toggle-select', text: 'select or unselect the event under the cursor' },
  { modes: ['grid'], keys: ['Shift+ArrowLeft', 'Shift+ArrowRight', 'Shift+ArrowUp', 'Shift+ArrowDown'], action: 'extend-left', text: 'move and add to the selection' },
  { modes: ['grid'], keys: ['a'], action: 'select-shown', text: 'select every event the filters show (all pages)' },
  { modes: ['grid'], keys: ['Escape'], action: 'clear-selection', text: 'clear the selection' },
  { modes: ['grid', 'detail'], keys: ['k'], action: 'keep', text: 'keep (the selection, else the event under the cursor)' },
  { modes: ['grid', 'detail'], keys: ['s'], action: 'set-aside', text: 'set aside (asks first when many, or when motion was seen)' },
  { modes: ['grid', 'detail'], keys: ['u'], action: 'undo', text: 'undo the last decisions, one batch at a time' },
  { modes: ['grid'], keys: ['Enter'], action: 'open', text: 'open the event' },
  { modes: ['grid'], keys: ['1'], action: 'verdict-blank', text: 'show likely blank only' },
  { modes: ['grid'], keys: ['2'], action: 'verdict-unsure', text: 'show unsure only' },
  { modes: ['grid'], keys: ['3'], action: 'verdict-motion', text: 'show motion only' },
  { modes: ['grid'], keys: ['0'], action: 'verdict-any', text: 'show every verdict' },
  { modes: ['grid'], keys: ['d'], action: 'cycle-decision', text: 'decision filter: any, undecided, kept, set aside' },
  { modes: ['grid'], keys: ['n'], action: 'cycle-light', text: 'light filter: any, day, night (infrared)' },
  { modes: ['grid'], keys: ['p'], action: 'cycle-deployment', text: 'deployment filter: next deployment, then any' },
  { modes: ['grid'], keys: ['-'], action: 'score-lower', text: 'show scores at most 0.05 lower' },
  { modes: ['grid'], keys: ['=', '+'], action: 'score-raise', text: 'show scores at most 0.05 higher (to every score)' },
  { modes: ['grid'], keys: [',', '.'], action: 'floor-lower', text: 'show scores at least 0.05 lower / higher' },
  { modes: ['grid'], keys: ['o'], action: 'toggle-order', text: 'order by time or by score' },
  { modes: ['grid'], keys: ['r'], action: 'reverse-order', text: 'reverse the order' },
  { modes: ['grid', 'detail', 'audit'], keys: ['h'], action: 'toggle-heat', text: 'change overlay on or off' },
  { modes: ['detail', 'audit'], keys: ['ArrowLeft', 'ArrowRight'], action: 'frame-prev', text: 'burst: previous / next frame · clip: 2 s back / forward' },
  { modes: ['detail'], keys: ['ArrowUp', 'ArrowDown'], action: 'event-prev', text: 'previous / next event in the grid order' },
  { modes: ['audit'], keys: ['ArrowUp', 'ArrowDown'], action: 'event-prev', text: 'previous / next sampled event' },
  { modes: ['detail', 'audit'], keys: ['[', ']'], action: 'window-prev', text: 'clip: previous / next activity window' },
  { modes: ['detail', 'audit'], keys: [' '], action: 'play-pause', text: 'clip: play or pause' },
  { modes: ['detail'], keys: ['Escape', 'Enter'], action: 'close', text: 'back to the grid' },
  { modes: ['audit'], keys: ['y'], action: 'audit-yes', text: 'there is an animal in this event' },
  { modes: ['audit'], keys: ['n'], action: 'audit-no', text: 'there is no animal in this event' },
  { modes: ['audit', 'act'], keys: ['Escape'], action: 'close', text: 'back to the grid' },
  { modes: ['grid', 'detail'], keys: ['v'], action: 'audit-mode', text: 'audit: check a random sample of the set-aside events' },
  { modes: ['grid', 'detail'], keys: ['m'], action: 'act-mode', text: 'act on the decisions: move set-aside media, undo, calibrate, export' },
  { modes: ['confirm'], keys: ['y'], action: 'confirm-yes', text: 'yes, record the decision' },
  { modes: ['confirm'], keys: ['Escape', 'n', 'Enter'], action: 'confirm-no', text: 'no, change nothing (the default)' },
  { modes: ['grid', 'detail', 'audit', 'act'], keys: ['?'], action: 'help', text: 'this list of keys' },
  { modes: ['help'], keys: ['Escape', '?'], action: 'close', text: 'close this list' },
  { modes: ['grid', 'detail'], keys: ['g'], action: 'start-screen', text: 'start screen: open another ledger or scan folders' },
];

/** Bindings that list several keys for a pair of actions (left/right, first/last...). */
const PAIRED: Partial<Record<Action, Action[]>> = {
  'move-left': ['move-left', 'move-right', 'move-up', 'move-down'],
  'extend-left': ['extend-left', 'extend-right', 'extend-up', 'extend-down'],
  'move-first': ['move-first', 'move-last'],
  'page-up': ['page-up', 'page-down'],
  'floor-lower': ['floor-lower', 'floor-raise'],
  'frame-prev': ['frame-prev', 'frame-next'],
  'event-prev': ['event-prev', 'event-next'],
  'window-prev': ['window-prev', 'window-next'],
};

export function keyName(e: Pick<KeyboardEvent, 'key' | 'shiftKey'>): string {
  const named = e.key.length > 1;
  return e.shiftKey && named ? `Shift+${e.key}` : e.key;
}

/** The action a key press means in a mode, if any. */
export function actionFor(mode: Mode, key: string): Action | undefined {
  for (const b of KEYS) {
    if (!b.modes.includes(mode)) continue;
    const i = b.keys.indexOf(key);
    if (i < 0) continue;
    const pair = PAIRED[b.action];
    return pair ? pair[Math.min(i, pair.length - 1)] : b.action;
  }
  return undefined;
}

/** How a key is written in the help list. */
export function keyLabel(k: string): string {
  const names: Record<string, string> = { Shift: '⇧', ArrowLeft: '←', ArrowRight: '→', ArrowUp: '↑', ArrowDown: '↓', ' ': 'Space', Escape: 'Esc', PageUp: 'PgUp', PageDown: 'PgDn' };
  return k.length > 1 ? k.split('+').map((p) => names[p] ?? p).join('') : names[k] ?? k;
}
