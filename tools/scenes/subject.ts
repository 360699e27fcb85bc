/**
 * An invented animal (or fish): a few soft ellipses with a furred or scaled texture, placed by
 * a path over time. Coverage is anti-aliased so masks and pixels agree at the edges.
 */
import type { Rng } from './random.js';
import { valueNoise, type Field } from './texture.js';

interface Part {
  dx: number;
  dy: number;
  rx: number;
  ry: number;
  /** How far this part swings (px) and how fast (radians per second): heads, legs, tails. */
  swing: number;
  rate: number;
  phase: number;
}

export interface Subject {
  parts: Part[];
  colour: number[];
  texture: Field;
  contrast: number;
  motion: SubjectPlan['motion'];
  /** Position of the body centre at time t (s), in frame pixels. */
  at: (t: number) => { x: number; y: number };
}

export interface SubjectPlan {
  kind: 'land' | 'fish';
  size: number;
  motion: 'cross' | 'linger' | 'partial';
  night: boolean;
  duration: number;
  /** A place visitors keep coming back to (a game trail, a bait, a burrow), as shares of the
   *  frame: a crossing subject walks along `y`, a lingering one stays near (`x`, `y`). Absent,
   *  the place is drawn for each subject. */
  spot?: { x: number; y: number };
}

export function makeSubject(rng: Rng, width: number, height: number, plan: SubjectPlan): Subject {
  const L = plan.size; // body length in px
  const parts: Part[] = [];
  const dir = rng.chance(0.5) ? 1 : -1;
  if (plan.kind === 'land') {
    parts.push({ dx: 0, dy: 0, rx: L / 2, ry: L * rng.range(0.18, 0.3), swing: 0, rate: 0, phase: 0 });
    parts.push({ dx: dir * L * 0.55, dy: -L * 0.2, rx: L * 0.16, ry: L * 0.13, swing: L * 0.06, rate: rng.range(2, 6), phase: rng.range(0, 6) });
    for (const s of [-0.3, 0.3]) {
      parts.push({ dx: s * L, dy: L * 0.3, rx: L * 0.05, ry: L * 0.2, swing: L * 0.05, rate: rng.range(3, 8), phase: rng.range(0, 6) });
    }
  } else {
    parts.push({ dx: 0, dy: 0, rx: L / 2, ry: L * rng.range(0.15, 0.3), swing: L * 0.01, rate: 3, phase: 0 });
    parts.push({ dx: -dir * L * 0.55, dy: 0, rx: L * 0.12, ry: L * 0.18, swing: L * 0.06, rate: rng.range(4, 9), phase: rng.range(0, 6) });
  }
  const base = plan.night
    ? [rng.range(0.5, 0.95), 0, 0]
    : plan.kind === 'fish'
      ? [rng.range(0.4, 0.9), rng.range(0.4, 0.8), rng.range(0.3, 0.7)]
      : rng.pick([
          [0.55, 0.35, 0.2],
          [0.3, 0.25, 0.2],
          [0.7, 0.65, 0.6],
          [0.15, 0.12, 0.1],
          [0.6, 0.45, 0.3],
        ]).map((v) => v * rng.range(0.8, 1.2));
  const colour = plan.night ? [base[0], base[0], base[0]] : base;
  const margin = L * 0.6;
  let at: Subject['at'];
  if (plan.motion === 'cross') {
    const speed = rng.range(0.04, 0.2) * width; // px per second
    const y0 = plan.spot ? plan.spot.y * height + rng.range(-0.03, 0.03) * height : rng.range(0.35, 0.85) * height;
    const vy = rng.range(-0.05, 0.05) * height;
    // Start so that the subject is in frame for the middle of the burst.
    const mid = rng.range(0.25, 0.75) * width;
    const tMid = plan.duration / 2;
    at = (t) => ({ x: mid + dir * speed * (t - tMid), y: y0 + vy * (t - tMid) });
  } else if (plan.motion === 'linger') {
    const drawnX = rng.range(margin, width - margin);
    const drawnY = rng.range(Math.min(height - margin, height * 0.35), height - margin);
    const x0 = plan.spot ? plan.spot.x * width + rng.range(-0.02, 0.02) * width : drawnX;
    const y0 = plan.spot ? plan.spot.y * height + rng.range(-0.02, 0.02) * height : drawnY;
    const drift = rng.range(0, 0.01) * width;
    at = (t) => ({ x: x0 + drift * Math.sin(t * 0.7), y: y0 + 0.3 * drift * Math.cos(t * 0.5) });
  } else {
    // Partly in frame: the body centre sits just inside or outside an edge.
    const side = rng.int(0, 2);
    const inset = rng.range(-0.2, 0.25) * L;
    const slow = rng.range(0, 0.04) * width;
    const along = rng.range(0.3, 0.7);
    at = (t) =>
      side === 0
        ? { x: inset + slow * t, y: along * height }
        : side === 1
          ? { x: width - inset - slow * t, y: along * height }
          : { x: along * width + slow * t, y: height - inset };
  }
  return { parts, colour, texture: valueNoise(rng, Math.max(1.5, L / 8), 3), contrast: rng.range(0.15, 0.45), motion: plan.motion, at };
}

/** Coverage (0..1) and colour of the subject at pixel (x, y) and time t. */
export function subjectAt(s: Subject, t: number, x: number, y: number, out: number[]): number {
  const c = s.at(t);
  let cover = 0;
  for (const p of s.parts) {
    const sx = p.swing ? p.swing * Math.sin(p.rate * t + p.phase) : 0;
    const ex = (x - (c.x + p.dx + sx)) / p.rx;
    const ey = (y - (c.y + p.dy + 0.3 * sx)) / p.ry;
    const r = Math.sqrt(ex * ex + ey * ey);
    // Soft edge about one pixel wide.
    const edge = Math.min(p.rx, p.ry);
    const v = Math.min(1, Math.max(0, (1 - r) * edge + 0.5));
    if (v > cover) cover = v;
  }
  if (cover > 0) {
    const tex = s.texture(x - c.x, y - c.y) - 0.5;
    for (let k = 0; k < 3; k++) out[k] = Math.min(1, Math.max(0, s.colour[k] * (1 + s.contrast * 2 * tex)));
  }
  return cover;
}

/** Bounding radius of the subject, for quick rejection of far pixels. */
export function subjectRadius(s: Subject): number {
  let r = 0;
  for (const p of s.parts) r = Math.max(r, Math.hypot(p.dx, p.dy) + Math.max(p.rx, p.ry) + p.swing);
  return r + 2;
}
