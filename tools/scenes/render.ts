/**
 * Renders an invented camera-trap burst, single trigger or survey clip with known ground truth.
 * Every scene carries some of the nuisances of real deployments (a little wind, sensor noise,
 * light drift) whatever its category, so the engine never learns a clean-room world.
 */
import { makeRgb, type RgbFrame } from '../../src/kernels/frame.js';
import { Category, isAnimal, isUnderwater, type CategoryName } from './categories.js';
import { makeRng, type Rng } from './random.js';
import { makeSubject, subjectAt, subjectRadius, type Subject } from './subject.js';
import { valueNoise, type Field } from './texture.js';
import { paintStrip, type StripStyle } from './data-strip.js';
import { makeWorld, sampleWorld, type Light, type World, type WorldStyle } from './world.js';

export interface Scene {
  seed: number;
  category: CategoryName;
  /** The false trigger an animal scene also carries, if any. */
  distractor?: CategoryName;
  light: Light;
  animal: boolean;
  width: number;
  height: number;
  times: number[];
  frames: RgbFrame[];
  /** Per frame, 1 where the subject covers the pixel by at least half. */
  subjectMasks: Uint8Array[];
  /** Frames of neighbouring empty triggers of the same camera (a deployment background). */
  neighbours: RgbFrame[];
}

interface Effects {
  swayAmp: number;
  swayRate: number;
  shake: number;
  surge: number;
  gainFrom: number;
  gainTo: number;
  lampStep: number;
  cloud: number;
  rain: number;
  insect: boolean;
  caustics: number;
  particles: number;
  noise: number;
}

function plan(rng: Rng, category: CategoryName, light: Light, distractor?: CategoryName, noiseScale = 1): Effects {
  const e: Effects = {
    swayAmp: rng.range(0, 1.2),
    swayRate: rng.range(1.5, 5),
    shake: 0,
    surge: 0,
    gainFrom: 1,
    gainTo: rng.range(0.97, 1.03),
    lampStep: 0,
    cloud: 0,
    rain: 0,
    insect: false,
    caustics: light === 'water' ? rng.range(0, 0.08) : 0,
    particles: light === 'water' ? rng.int(0, 30) : 0,
    noise: noiseScale * (light === 'ir' ? rng.range(2.5, 7) : light === 'water' ? rng.range(1.5, 4) : rng.range(1, 3.5)),
  };
  applyEffect(rng, e, category);
  // An animal in the middle of a false trigger (a fox in the rain, a fish in the surge): the
  // subject comes with the full strength of that trigger, not only the mild background of every scene.
  if (distractor) applyEffect(rng, e, distractor);
  return e;
}

/** Sets the effect that makes a scene of `category` what it is (no change for subjects and empties). */
function applyEffect(rng: Rng, e: Effects, category: CategoryName): void {
  switch (category) {
    case Category.wind:
      e.swayAmp = rng.range(2, 7);
      e.swayRate = rng.range(2, 6);
      break;
    case Category.kelp:
      e.swayAmp = rng.range(3, 8);
      e.swayRate = rng.range(0.8, 2.5);
      break;
    case Category.exposure:
      e.gainFrom = rng.range(0.6, 0.9);
      e.gainTo = rng.range(1.05, 1.4);
      break;
    case Category.cloudShadow:
      e.cloud = rng.range(0.25, 0.5);
      break;
    case Category.irLamp:
      e.lampStep = rng.range(0.25, 0.6) * (rng.chance(0.5) ? 1 : -1);
      break;
    case Category.rain:
      e.rain = rng.int(40, 200);
      break;
    case Category.insect:
      e.insect = true;
      break;
    case Category.shake:
      e.shake = rng.range(1.5, 6);
      break;
    case Category.surge:
      e.surge = rng.range(2, 7);
      e.swayAmp = rng.range(1, 4);
      break;
    case Category.caustics:
      e.caustics = rng.range(0.15, 0.35);
      break;
    case Category.particles:
      e.particles = rng.int(80, 300);
      break;
    default:
      break;
  }
}

interface Streak {
  x: number;
  y: number;
  len: number;
  bright: number;
}

export interface Renderer {
  world: World;
  effects: Effects;
  subject?: Subject;
  caustic: Field;
  cloud: Field;
  particles: Array<{ x: number; y: number; vx: number; vy: number; r: number }>;
  insectPath: (t: number) => { x: number; y: number };
  insectSize: number;
  insectDark: boolean;
  rng: Rng;
  duration: number;
}

export function makeRenderer(rng: Rng, category: CategoryName, light: Light, width: number, height: number, duration: number, worldRng: Rng = rng, distractor?: CategoryName, style: SceneStyle = {}): Renderer {
  const world = makeWorld(worldRng, width, height, light, style);
  const effects = plan(rng, category, light, distractor, style.noiseScale);
  let subject: Subject | undefined;
  if (isAnimal(category)) {
    const fish = category === Category.fishCrossing || category === Category.fishHovering;
    const small = category === Category.animalSmall;
    const motion =
      category === Category.animalLingering || category === Category.fishHovering
        ? 'linger'
        : category === Category.animalPartial
          ? 'partial'
          : category === Category.animalNight
            ? rng.pick(['cross', 'linger'] as const)
            : 'cross';
    const size = (small ? rng.range(0.04, 0.07) : rng.range(0.1, 0.3)) * width;
    subject = makeSubject(rng, width, height, { kind: fish ? 'fish' : 'land', size, motion, night: light === 'ir', duration, spot: style.spot });
  }
  const s = width / 320;
  const ipx = rng.range(0.2, 0.8) * width, ipy = rng.range(0.2, 0.8) * height;
  const ivx = rng.range(-0.3, 0.3) * width, ivy = rng.range(-0.3, 0.3) * height;
  const wob = rng.range(3, 9);
  return {
    world,
    effects,
    subject,
    caustic: valueNoise(rng, rng.range(12, 30) * s, 2),
    cloud: valueNoise(rng, rng.range(80, 160) * s, 2),
    particles: Array.from({ length: effects.particles }, () => ({
      x: rng.range(0, width), y: rng.range(0, height),
      vx: rng.range(-0.05, 0.05) * width, vy: rng.range(-0.03, 0.03) * height, r: rng.range(0.6, 1.6) * s,
    })),
    insectPath: (t) => ({ x: ipx + ivx * t + 0.15 * width * Math.sin(wob * t), y: ipy + ivy * t + 0.12 * height * Math.cos(wob * 1.3 * t) }),
    insectSize: rng.range(0.06, 0.16) * width,
    insectDark: rng.chance(0.5),
    rng,
    duration,
  };
}

export function renderFrame(r: Renderer, t: number, showSubject: boolean, frameRng: Rng, subjectT = t): { frame: RgbFrame; mask: Uint8Array } {
  const { world, effects: e } = r;
  const { width: w, height: h, margin } = world;
  const frame = makeRgb(w, h);
  const mask = new Uint8Array(w * h);
  const gw = w + 2 * margin;
  const ox = e.shake * frameRng.normal() * 0.7 + e.surge * Math.sin(t * 1.3);
  const oy = e.shake * frameRng.normal() * 0.5 + 0.4 * e.surge * Math.cos(t * 1.1);
  const tn = r.duration > 0 ? Math.min(1, Math.max(0, subjectT / r.duration)) : 0;
  const gain = (e.gainFrom + (e.gainTo - e.gainFrom) * tn) * (e.lampStep && tn >= 0.5 ? 1 + e.lampStep : 1);
  const lampFalloff = e.lampStep && tn >= 0.5 ? 0.5 + e.lampStep : 0.5;
  const streaks: Streak[] = Array.from({ length: e.rain }, () => ({
    x: frameRng.range(0, w), y: frameRng.range(0, h), len: frameRng.range(3, 12) * (w / 320), bright: frameRng.range(0.15, 0.5),
  }));
  const sub = showSubject ? r.subject : undefined;
  const sc = sub?.at(subjectT);
  const srad = sub ? subjectRadius(sub) : 0;
  const ins = e.insect ? r.insectPath(t) : undefined;
  const rgb = [0, 0, 0];
  const srgb = [0, 0, 0];
  const cx = w / 2, cy = h / 2, rmax = Math.hypot(cx, cy);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const p = y * w + x;
      const wx = x + ox, wy = y + oy;
      const g = Math.round(wy + margin) * gw + Math.round(wx + margin);
      const sw = world.sway[g] ?? 0;
      const d = sw > 0 ? e.swayAmp * sw * Math.sin(e.swayRate * t + world.phase[g]) : 0;
      sampleWorld(world, wx + margin + d, wy + margin + 0.3 * d, rgb);
      if (sub && sc && Math.abs(wx - sc.x) < srad && Math.abs(wy - sc.y) < srad) {
        const cover = subjectAt(sub, subjectT, wx, wy, srgb);
        if (cover > 0) for (let k = 0; k < 3; k++) rgb[k] += cover * (srgb[k] - rgb[k]);
        if (cover >= 0.5 && x >= 0 && y >= 0) mask[p] = 1;
      }
      let light = gain;
      if (world.light === 'ir') light *= 1.25 - Math.pow(Math.hypot(x - cx, y - cy) / rmax, 2) * lampFalloff;
      if (e.cloud) light *= 1 - e.cloud * Math.min(1, Math.max(0, (r.cloud(x + t * 0.4 * w, y) - 0.45) * 5));
      if (e.caustics) light *= 1 + e.caustics * (2 * Math.abs(r.caustic(x + 20 * t, y - 15 * t) - 0.5) * 2 - 0.5);
      for (let k = 0; k < 3; k++) rgb[k] *= light;
      if (ins) {
        const dd = Math.hypot(x - ins.x, y - ins.y) / r.insectSize;
        if (dd < 1.5) {
          const a = 0.6 * Math.exp(-dd * dd * 2);
          for (let k = 0; k < 3; k++) rgb[k] += a * ((r.insectDark ? 0.05 : 0.9) - rgb[k]);
        }
      }
      const n = e.noise / 255;
      const grey = world.light === 'ir';
      const n0 = n * frameRng.normal();
      for (let k = 0; k < 3; k++) {
        const v = rgb[k] + (grey ? n0 : n * frameRng.normal());
        frame.data[p * 3 + k] = Math.max(0, Math.min(255, Math.round(v * 255)));
      }
    }
  }
  for (const s of streaks) drawStreak(frame, s);
  for (const q of r.particles) {
    const px = q.x + q.vx * t, py = q.y + q.vy * t;
    drawDot(frame, ((px % w) + w) % w, ((py % h) + h) % h, q.r, 0.5);
  }
  return { frame, mask };
}

function drawStreak(f: RgbFrame, s: Streak): void {
  for (let i = 0; i < s.len; i++) {
    const x = Math.round(s.x + i * 0.25), y = Math.round(s.y + i);
    if (x < 0 || y < 0 || x >= f.width || y >= f.height) continue;
    const p = (y * f.width + x) * 3;
    for (let k = 0; k < 3; k++) f.data[p + k] = Math.round(f.data[p + k] + s.bright * (255 - f.data[p + k]));
  }
}

function drawDot(f: RgbFrame, cx: number, cy: number, r: number, a: number): void {
  for (let y = Math.floor(cy - r); y <= Math.ceil(cy + r); y++) {
    for (let x = Math.floor(cx - r); x <= Math.ceil(cx + r); x++) {
      if (x < 0 || y < 0 || x >= f.width || y >= f.height) continue;
      const cover = Math.max(0, Math.min(1, r + 0.5 - Math.hypot(x - cx, y - cy)));
      const p = (y * f.width + x) * 3;
      for (let k = 0; k < 3; k++) f.data[p + k] = Math.round(f.data[p + k] + a * cover * (255 - f.data[p + k]));
    }
  }
}

/**
 * Middle frames of the neighbouring triggers a scan would pass in: the same camera minutes or
 * hours apart, so not clean. Each has its own exposure and colour balance, its own smooth
 * shading (the sun moved, a cloud), and in one case of five a visitor. A subject that lingers
 * or sits at the edge is still there minutes later, at about the same place (the hard case: a
 * median of neighbours that mostly hold it hides it); a crossing one is long gone, so its
 * neighbours, like those of an empty scene, get some other animal crossing. Drawn from their
 * own random stream, so the trigger's frames do not change with them.
 */
function renderNeighbours(req: SceneRequest, r: Renderer, light: Light, width: number, height: number, duration: number, frameRng: Rng): RgbFrame[] {
  const nrng = makeRng(req.seed * 104_729 + 11 + (req.event ?? 0) * 389);
  const out: RgbFrame[] = [];
  for (let k = 0; k < 4; k++) {
    let rr = r;
    let subjectT = 10 + k * 37.3;
    let show = false;
    if (nrng.chance(0.2)) {
      show = true;
      if (r.subject && r.subject.motion !== 'cross') {
        subjectT = duration / 2 + nrng.range(5, 120) * (nrng.chance(0.5) ? 1 : -1);
      } else {
        const size = nrng.range(0.06, 0.3) * width;
        rr = { ...r, subject: makeSubject(nrng, width, height, { kind: light === 'water' ? 'fish' : 'land', size, motion: 'cross', night: light === 'ir', duration: 1 }) };
        subjectT = nrng.range(0.2, 0.8);
      }
    }
    const frame = renderFrame(rr, 10 + k * 37.3, show, frameRng, subjectT).frame;
    const exposure = Math.exp(0.12 * nrng.normal());
    const tint = [0, 1, 2].map(() => (light === 'ir' ? 1 : 1 + 0.03 * nrng.normal()));
    const shadeAmp = nrng.range(0, 0.12);
    const shade = valueNoise(nrng, nrng.range(60, 160) * (width / 320), 1);
    const d = frame.data;
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        const g = exposure * (1 + shadeAmp * (2 * shade(x, y) - 1));
        const p = (y * width + x) * 3;
        for (let c = 0; c < 3; c++) d[p + c] = Math.max(0, Math.min(255, Math.round(d[p + c] * g * tint[c])));
      }
    }
    out.push(frame);
  }
  return out;
}

/** A camera and place beyond the generator's usual ranges (tools/scenes/families.ts draws them). */
export interface SceneStyle extends WorldStyle {
  /** Sensor noise as a multiple of the usual draw. */
  noiseScale?: number;
  /** Where this place's visitors pass or stay (SubjectPlan.spot). */
  spot?: { x: number; y: number };
}

export interface SceneRequest {
  seed: number;
  category: CategoryName;
  /** Frames in the trigger: 1 for a single image, 3-10 for a burst. Drawn from the seed if absent. */
  frames?: number;
  width?: number;
  height?: number;
  /** Another trigger of the same camera (same world and effects, a later moment). */
  event?: number;
  /** Paint a camera data strip (time and frame counter) that changes every frame. */
  strip?: StripStyle;
  /** Seed of the place: triggers with the same world seed, size and light show the same scene
   *  (one camera's deployment); absent, the place comes from `seed`. */
  world?: number;
  /** Light of a land scene (day or infrared night); underwater categories are always 'water'. */
  light?: Light;
  /** A false-trigger category whose effect an animal scene also carries at full strength
   *  (same light as the animal: a land trigger for land animals, a water one for fish). */
  distractor?: CategoryName;
  /** Camera and place beyond the usual ranges. */
  style?: SceneStyle;
  /** Seconds between the frames of a burst (drawn from 0.3-1.2 s if absent). */
  intervalS?: number;
  /** False: render no neighbouring triggers (a caller that renders a whole deployment has them). */
  neighbours?: boolean;
}

export function renderScene(req: SceneRequest): Scene {
  const rng = makeRng(req.seed * 7919 + 17);
  const light: Light = isUnderwater(req.category)
    ? 'water'
    : req.light && req.light !== 'water'
      ? req.light
      : req.category === Category.animalNight || req.category === Category.irLamp
      ? 'ir'
      : // A cloud shadow needs the sun: at night the camera's own lamp is the light (the draw
        // is made either way, so that the other scenes of a seed stay as they were).
        rng.chance(0.3) && req.category !== Category.cloudShadow && req.distractor !== Category.cloudShadow
        ? 'ir'
        : 'day';
  const width = req.width ?? rng.pick([192, 256, 320, 384, 480]);
  const height = req.height ?? Math.round((width * rng.pick([9, 12])) / 16);
  const n = req.frames ?? rng.int(3, 10);
  const drawnInterval = rng.range(0.3, 1.2);
  const interval = req.intervalS ?? drawnInterval;
  const duration = (n - 1) * interval;
  const r = makeRenderer(rng, req.category, light, width, height, Math.max(duration, 1), req.world !== undefined ? makeRng(req.world * 7919 + 23) : rng, req.distractor, req.style);
  const t0 = (req.event ?? 0) * 53.7;
  const times = Array.from({ length: n }, (_, i) => t0 + i * interval);
  const frames: RgbFrame[] = [];
  const subjectMasks: Uint8Array[] = [];
  const frameRng = makeRng(req.seed * 31 + 5 + (req.event ?? 0) * 7777);
  for (const t of times) {
    const { frame, mask } = renderFrame(r, t, true, frameRng, t - t0);
    frames.push(frame);
    subjectMasks.push(mask);
  }
  const neighbours = req.neighbours === false ? [] : renderNeighbours(req, r, light, width, height, duration, frameRng);
  if (req.strip) {
    const clock = rng.int(0, 86399);
    frames.forEach((f, i) => paintStrip(f, req.strip!, `${clock + Math.floor(times[i])}${i + 1}${n}`));
    neighbours.forEach((f, i) => paintStrip(f, req.strip!, `${clock - 600 * (i + 1)}1${n}`));
  }
  // An animal is present when a person could see it: at least 0.05% of the frame (16 px at
  // the least) in some frame. A sliver of a tail at the edge is not a visible animal.
  const visible = Math.max(16, 0.0005 * width * height);
  const animal = isAnimal(req.category) && subjectMasks.some((m) => m.reduce((a, v) => a + v, 0) >= visible);
  return { seed: req.seed, category: req.category, ...(req.distractor ? { distractor: req.distractor } : {}), light, animal, width, height, times, frames, subjectMasks, neighbours };
}

