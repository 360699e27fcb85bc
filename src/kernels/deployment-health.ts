/**
 * Deployment health: what went wrong with the camera rather than in front of it, judged over a
 * whole deployment from what each trigger already recorded (capture time, file name, and the
 * scene signature of its middle frame, scene-signature.ts). A technician needs to know that
 * half a season's triggers were taken with a fogged lens or a dead lamp, or that the clock was
 * reset, before trusting what the screener made of them. A camera that was moved or turned is
 * read from the neighbour comparisons the deployment backgrounds already made (a coarse
 * picture of the view was tried first: cloud shadows moved it as much as a turned camera).
 *
 * Each rule compares a trigger with the deployment's own usual (its median, per light mode), not
 * with a fixed idea of a good picture, so it holds for any camera and place. Thresholds are our
 * choices, stated with each; a finding is a prompt to look, never a verdict on an event.
 */
import type { HealthCode, HealthFinding } from '../shared/health.js';
import type { SceneSignature } from './scene-signature.js';
import { median } from './select.js';

export type { HealthCode, HealthFinding };

export interface HealthInput {
  id: string;
  /** Capture time as recorded (ISO-8601, with or without offset). */
  time: string;
  sortMs: number;
  /** File name of the trigger's first file (its number orders the shots as the camera took them). */
  file: string;
  light: 'day' | 'ir' | null;
  scene?: SceneSignature;
  /** The trigger's middle file: what other triggers' neighbour records name. */
  midFile?: string;
  /** How the trigger's neighbours (other triggers' middle files) fitted it when its deployment
   *  background was built (deployment-background.ts). */
  neighbours?: NeighbourRecord[];
}

export interface NeighbourRecord {
  file: string;
  kept: boolean;
  /** Median absolute luma difference after alignment and gain (grey levels). */
  disagreement: number;
  compensated?: boolean;
  shift: { dx: number; dy: number };
}

/** Capture times before this are a clock that was never set or was reset to its factory default
 *  (often the first day of 2000; our choice of bound, from memory of camera manuals). */
const EARLIEST_PLAUSIBLE = Date.UTC(2001, 0, 1);
/** A later shot more than this much earlier than the one before it (by file number): the clock
 *  was changed or reset between them. Daylight-saving changes move clocks by an hour; our
 *  choice is to report those too, since they shift every later time. */
const BACKWARDS_MS = 10 * 60 * 1000;
/** Texture below this share of the deployment's median (same light): a fogged, wet or covered
 *  lens. A frame's texture falls with night noise filtering and rain too, so runs of at least
 *  MIN_RUN triggers are reported, not single ones. */
const OBSCURED_SHARE = 0.35;
/** Night frames darker than this share of the deployment's usual night (and below 20 grey
 *  levels): the infrared lamp did not light the scene. */
const DARK_SHARE = 0.3;
const DARK_LEVEL = 20;
const MIN_RUN = 2;
/** Two triggers disagree when their neighbour comparison (the larger of the two directions)
 *  is more than FAR_FACTOR times the deployment's median comparison and FAR_LEVELS grey
 *  levels: light differs between triggers (a cloud, another hour), so only what is far beyond
 *  this camera's usual counts. A change of view between two triggers: at least ACROSS of the
 *  pairs across them disagree, while at least SIDE of the pairs on each side agree. A trigger
 *  far from its neighbours on both sides (a cloud shadow, an insect on the lens) says nothing
 *  about the view and is left out first. Our choices. */
const FAR_FACTOR = 3;
const FAR_LEVELS = 2.5;
const ACROSS = 0.75;
const SIDE = 0.75;

const fileNumber = (f: string): number | undefined => {
  const m = /(\d+)(?!.*\d)/.exec(f.split('/').pop() ?? f);
  return m ? Number(m[1]) : undefined;
};


/** Runs of consecutive triggers (in capture order) for which `hit` holds, at least `min` long. */
function runs(list: readonly HealthInput[], hit: (e: HealthInput) => boolean, min: number): HealthInput[][] {
  const out: HealthInput[][] = [];
  let cur: HealthInput[] = [];
  for (const e of list) {
    if (hit(e)) cur.push(e);
    else {
      if (cur.length >= min) out.push(cur);
      cur = [];
    }
  }
  if (cur.length >= min) out.push(cur);
  return out;
}

const finding = (code: HealthCode, run: readonly HealthInput[], message: string): HealthFinding => ({ code, from: run[0].id, to: run[run.length - 1].id, events: run.length, eventIds: run.map((e) => e.id), message });

interface ViewChange {
  before: HealthInput;
  after: HealthInput;
  /** The first trigger of the next change, if any. */
  until?: HealthInput;
  pairs: number;
}

/**
 * Where the camera was moved: a boundary in capture order (per light mode, as neighbours are
 * chosen) across which the neighbour comparisons disagree and on both sides of which they agree.
 */
function viewChanges(byTime: readonly HealthInput[]): ViewChange[] {
  const out: ViewChange[] = [];
  for (const light of ['day', 'ir', null] as const) {
    const same = byTime.filter((e) => e.light === light && e.neighbours && e.midFile);
    const at = new Map(same.map((e, i) => [e.midFile!, i]));
    const far = new Map<string, number>();
    same.forEach((e, i) => {
      for (const n of e.neighbours!) {
        const j = at.get(n.file);
        if (j === undefined || j === i) continue;
        const key = `${Math.min(i, j)},${Math.max(i, j)}`;
        far.set(key, Math.max(far.get(key) ?? 0, n.disagreement));
      }
    });
    if (far.size < 6) continue;
    const limit = Math.max(FAR_LEVELS, FAR_FACTOR * median([...far.values()]));
    const pairs = [...far].map(([k, d]) => {
      const [i, j] = k.split(',').map(Number);
      return { i, j, agree: d <= limit };
    });
    const sideOf = (i: number, later: boolean) => pairs.filter((p) => (later ? p.i === i : p.j === i)).map((p) => (p.agree ? 0 : 1));
    const odd = same.map((_, i) => {
      const l = sideOf(i, false), r = sideOf(i, true);
      const share = (v: number[]) => (v.length ? v.reduce((a, b) => a + b, 0) / v.length : NaN);
      const both = [share(l), share(r)].filter((v) => !Number.isNaN(v));
      return both.length > 0 && Math.min(...both) > 0.5;
    });
    const keep = same.map((_, i) => i).filter((i) => !odd[i]);
    const pos = new Map(keep.map((i, k) => [i, k]));
    const clean = pairs.filter((p) => pos.has(p.i) && pos.has(p.j)).map((p) => ({ a: pos.get(p.i)!, b: pos.get(p.j)!, agree: p.agree }));
    let lastB = -10;
    let best: { b: number; share: number; n: number } | undefined;
    const flush = () => {
      if (best) out.push({ before: same[keep[best.b - 1]], after: same[keep[best.b]], pairs: best.n });
      best = undefined;
    };
    for (let b = 1; b < keep.length; b++) {
      const across = clean.filter((p) => p.a < b && p.b >= b);
      const left = clean.filter((p) => p.b < b && p.a >= b - 3);
      const right = clean.filter((p) => p.a >= b && p.b <= b + 2);
      if (across.length < 2 || !left.length || !right.length) continue;
      const share = across.filter((p) => !p.agree).length / across.length;
      const agree = (v: typeof clean) => v.filter((p) => p.agree).length / v.length;
      if (share < ACROSS || agree(left) < SIDE || agree(right) < SIDE) continue;
      // Neighbouring boundaries see the same change: keep the clearest of a cluster.
      if (b - lastB > 2) flush();
      if (!best || share > best.share) best = { b, share, n: across.length };
      lastB = b;
    }
    flush();
  }
  out.sort((a, b) => a.after.sortMs - b.after.sortMs);
  for (let k = 0; k + 1 < out.length; k++) out[k].until = out[k + 1].after;
  return out;
}

/** `events` of one deployment, any order; `now` bounds plausible times from above. */
export function deploymentHealth(events: readonly HealthInput[], now = Date.now()): HealthFinding[] {
  const byTime = [...events].sort((a, b) => a.sortMs - b.sortMs);
  const out: HealthFinding[] = [];

  const implausible = byTime.filter((e) => e.sortMs < EARLIEST_PLAUSIBLE || e.sortMs > now + 86_400_000);
  if (implausible.length) out.push(finding('clock-implausible', implausible, `${implausible.length} trigger(s) carry a capture time before 2001 or in the future (${implausible[0].time}): the camera's clock was not set or was reset`));

  // In the order the camera numbered its files, time should not run backwards.
  const byFile = [...events].filter((e) => fileNumber(e.file) !== undefined).sort((a, b) => fileNumber(a.file)! - fileNumber(b.file)! || a.file.localeCompare(b.file));
  for (let i = 1; i < byFile.length; i++) {
    const a = byFile[i - 1], b = byFile[i];
    if (a.sortMs - b.sortMs > BACKWARDS_MS) {
      const hours = (a.sortMs - b.sortMs) / 3_600_000;
      const span = hours >= 24 * 365 ? `${(hours / 24 / 365.25).toFixed(1)} years` : hours >= 48 ? `${(hours / 24).toFixed(0)} days` : `${hours.toFixed(1)} h`;
      out.push(finding('clock-backwards', [a, b], `the clock went back ${span} between ${a.file} (${a.time}) and ${b.file} (${b.time}): it was changed or reset, and times after it may be wrong`));
    }
  }

  for (const change of viewChanges(byTime)) {
    const run = byTime.slice(byTime.indexOf(change.after), change.until ? byTime.indexOf(change.until) : byTime.length);
    out.push(finding('view-changed', run, `the view changed between ${change.before.file} (${change.before.time}) and ${change.after.file} (${change.after.time}): the camera was moved or turned (${change.pairs} neighbour comparisons across it disagree); check the triggers after it, and where the camera points`));
  }

  for (const light of ['day', 'ir'] as const) {
    const same = byTime.filter((e) => e.light === light && e.scene);
    if (same.length < 5) continue;
    const texture = median(same.map((e) => e.scene!.texture));
    for (const run of runs(same, (e) => e.scene!.texture < OBSCURED_SHARE * texture, MIN_RUN)) {
      out.push(finding('lens-obscured', run, `${run.length} ${light === 'ir' ? 'night' : 'day'} triggers from ${run[0].time} to ${run[run.length - 1].time} show far less detail than the deployment's usual (${(100 * run[0].scene!.texture / texture).toFixed(0)}% of it): the lens was fogged, wet or covered`));
    }
    if (light === 'ir') {
      const luma = median(same.map((e) => e.scene!.luma));
      for (const run of runs(same, (e) => e.scene!.luma < Math.min(DARK_LEVEL, DARK_SHARE * luma), MIN_RUN)) {
        out.push(finding('night-dark', run, `${run.length} night triggers from ${run[0].time} to ${run[run.length - 1].time} are nearly black (mean ${run[0].scene!.luma.toFixed(0)} against a usual ${luma.toFixed(0)}): the infrared lamp did not light the scene (battery low or lamp failed); an animal there may not show`));
      }
    }
  }
  return out;
}
