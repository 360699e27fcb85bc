/**
 * The static world of one invented scene: a textured backdrop with vegetation (or reef and kelp
 * under water), pre-sampled with a margin so camera shake and sway can look beyond the frame.
 */
import type { Rng } from './random.js';
import { valueNoise } from './texture.js';

export type Light = 'day' | 'ir' | 'water';

export interface World {
  width: number;
  height: number;
  margin: number;
  light: Light;
  /** Backdrop colour, float RGB 0..1, (width + 2 margin) x (height + 2 margin). */
  colour: Float32Array;
  /** Where vegetation (kelp under water) sways, 0..1, same grid. */
  sway: Float32Array;
  /** Per-pixel phase of the sway, radians, same grid. */
  phase: Float32Array;
}

function mix(a: number[], b: number[], t: number): number[] {
  return a.map((v, i) => v + (b[i] - v) * t);
}

/** What a camera's place may hold beyond the generator's usual range (all optional: absent, the
 *  usual draw, so existing seeds render as before). */
export interface WorldStyle {
  /** Range the share of the ground under vegetation is drawn from (usual: 0.25-0.7). */
  vegetation?: readonly [number, number];
  /** Water colour (RGB 0..1 at the surface; usual: a blue-green) and turbidity 0..1: the share
   *  of each pixel's colour replaced by the water's own haze. */
  water?: { tint: readonly number[]; turbidity: number };
}

export function makeWorld(rng: Rng, width: number, height: number, light: Light, style: WorldStyle = {}): World {
  const margin = Math.ceil(Math.max(width, height) * 0.06) + 4;
  const gw = width + 2 * margin;
  const gh = height + 2 * margin;
  const scale = width / 320;
  const ground = valueNoise(rng, rng.range(14, 40) * scale, 4);
  const detail = valueNoise(rng, rng.range(3, 6) * scale, 2);
  const cover = valueNoise(rng, rng.range(50, 120) * scale, 2);
  const phaseField = valueNoise(rng, 30 * scale, 1);
  const vegAmount = rng.range(...(style.vegetation ?? ([0.25, 0.7] as const)));
  const groundA = light === 'water' ? [0.05, 0.25, 0.3] : [rng.range(0.3, 0.5), rng.range(0.25, 0.4), rng.range(0.15, 0.25)];
  const groundB = light === 'water' ? [0.3, 0.45, 0.4] : [rng.range(0.55, 0.75), rng.range(0.5, 0.65), rng.range(0.35, 0.5)];
  const vegA = light === 'water' ? [0.1, 0.3, 0.12] : [rng.range(0.05, 0.15), rng.range(0.2, 0.35), rng.range(0.05, 0.12)];
  const vegB = light === 'water' ? [0.35, 0.5, 0.2] : [rng.range(0.3, 0.45), rng.range(0.5, 0.7), rng.range(0.15, 0.3)];
  const colour = new Float32Array(gw * gh * 3);
  const sway = new Float32Array(gw * gh);
  const phase = new Float32Array(gw * gh);
  const depthTop = rng.range(0.9, 1.3);
  for (let y = 0; y < gh; y++) {
    for (let x = 0; x < gw; x++) {
      const p = y * gw + x;
      const c = cover(x, y);
      const v = Math.min(1, Math.max(0, (c - (1 - vegAmount)) * 6));
      const g = ground(x, y) * 0.7 + detail(x, y) * 0.3;
      const leaf = detail(x * 1.7 + 100, y * 1.7) * 0.6 + ground(x + 500, y) * 0.4;
      let rgb = mix(mix(groundA, groundB, g), mix(vegA, vegB, leaf), v);
      if (light === 'ir') {
        const grey = 0.299 * rgb[0] + 0.587 * rgb[1] + 0.114 * rgb[2];
        // Foliage reflects near infrared strongly: vegetation reads bright at night.
        const yv = grey * (1 - v) + (0.35 + 0.4 * leaf) * v;
        rgb = [yv, yv, yv];
      } else if (light === 'water') {
        const depth = depthTop - 0.5 * (y / gh);
        rgb = rgb.map((val) => val * depth);
        if (style.water) {
          const { tint, turbidity } = style.water;
          rgb = rgb.map((val, k) => val * (1 - turbidity) + tint[k] * depth * turbidity);
        }
      }
      colour[p * 3] = rgb[0];
      colour[p * 3 + 1] = rgb[1];
      colour[p * 3 + 2] = rgb[2];
      sway[p] = v;
      phase[p] = phaseField(x, y) * 4 * Math.PI;
    }
  }
  return { width, height, margin, light, colour, sway, phase };
}

/** Bilinear sample of the world's colour at grid position (gx, gy), clamped to the grid. */
export function sampleWorld(world: World, gx: number, gy: number, out: number[]): void {
  const gw = world.width + 2 * world.margin;
  const gh = world.height + 2 * world.margin;
  const x = Math.min(gw - 1.001, Math.max(0, gx));
  const y = Math.min(gh - 1.001, Math.max(0, gy));
  const x0 = Math.floor(x), y0 = Math.floor(y);
  const fx = x - x0, fy = y - y0;
  const c = world.colour;
  const i00 = (y0 * gw + x0) * 3, i01 = i00 + 3, i10 = i00 + gw * 3, i11 = i10 + 3;
  for (let k = 0; k < 3; k++) {
    const top = c[i00 + k] + fx * (c[i01 + k] - c[i00 + k]);
    const bot = c[i10 + k] + fx * (c[i11 + k] - c[i10 + k]);
    out[k] = top + fy * (bot - top);
  }
}
