/**
 * Local shading: the part of a lighting change that one gain per frame cannot follow. A cloud
 * shadow drifting across the scene, the sun breaking through on half of it, an infrared lamp
 * that lights the near ground more than the far: the light changes smoothly over the frame and
 * multiplies what is there. A subject is different: it replaces what is there.
 *
 * The frame is cut into cells; each cell's gain is the median ratio of `reference` to
 * `current` luma over its pixels. The field those gains make (bilinear between cell centres) is
 * trusted in a cell with texture whose pixels mostly follow it within the noise: the texture is
 * the same, only lit differently. A cell where the texture differs (a subject, a swaying
 * branch) or where there is none to judge by (a flat sky, where a uniform subject and a shadow
 * look alike) takes the mean gain of its trusted or filled neighbours, ring by ring outwards.
 * With no trusted cell the field is 1: the frame keeps its global normalisation
 * (src/kernels/photometric.ts) and nothing else.
 *
 * analyse-event.ts relights each frame (and the deployment background) before its global gain
 * and offset are fitted, which then take up what the field left. A subject's pixels are scaled
 * by the light around them, as a subject walking into a shadow is.
 */
import { checkFrame, checkSameShape, makeRgb, type GreyFrame, type RgbFrame } from './frame.js';
import { medianAbsLumaDiff, toLuma } from './luma.js';
import { selectKth } from './select.js';
import { checkNumber } from '../shared/validate.js';

export interface ShadingField {
  /** Cells across and down. */
  columns: number;
  rows: number;
  /** Gain per cell (reference ~ gain * current), row-major. */
  gain: Float32Array;
  /** 1 where the cell's own pixels gave its gain, 0 where it was filled from around it. */
  trusted: Uint8Array;
}

export interface ShadingOptions {
  /** Cells across the shorter side of the frame (default 16). */
  cellsAcross?: number;
  /** Share of a cell's pixels that must follow the field within the noise (default 0.75). */
  minFollowing?: number;
  /** A cell has texture to judge by when its reference spans this many noise sigmas, 10th to
   *  90th percentile (default 6). */
  textureSigmas?: number;
  /** A pixel follows when its residual is within this many noise sigmas (default 3). */
  sigmas?: number;
}

// Below this luma (0..255) a ratio says little; at 250 and above the pixel may be clipped.
const DARK = 12, BRIGHT = 250;
const GAIN_LIMITS = [0.33, 3] as const;
// For Gaussian residuals, the 25th percentile of |x| is 0.3186 sigma (normal quantile at 0.625).
const Q25_TO_SIGMA = 1 / 0.3186;
// Statistics read every STEP-th pixel of every STEP-th row: a cell of 10 px still gives 25
// samples, plenty for a median, at a quarter of the cost.
const STEP = 2;
// Residual histogram bins per grey level.
const BINS = 4;

/**
 * The shading field mapping `current` onto `reference`, from their luma (ITU-R BT.601, as
 * toLuma gives it).
 */
export function fitShading(reference: GreyFrame, current: GreyFrame, valid?: Uint8Array, options: ShadingOptions = {}): ShadingField {
  checkFrame('reference', reference, 1);
  checkFrame('current', current, 1);
  checkSameShape('reference', reference, 'current', current);
  const across = options.cellsAcross ?? 16;
  const minFollowing = options.minFollowing ?? 0.75;
  const textureSigmas = options.textureSigmas ?? 6;
  const sigmas = options.sigmas ?? 3;
  checkNumber('cellsAcross', across, 1, 200);
  checkNumber('minFollowing', minFollowing, 0.01, 1);
  checkNumber('sigmas', sigmas, 0.5, 20);
  checkNumber('textureSigmas', textureSigmas, 0, 100);
  const { width: w, height: h } = reference;
  const size = Math.max(4, Math.round(Math.min(w, h) / across));
  const columns = Math.max(1, Math.round(w / size)), rows = Math.max(1, Math.round(h / size));
  const cells = columns * rows;
  const xs = Array.from({ length: columns + 1 }, (_, i) => Math.round((i * w) / columns));
  const ys = Array.from({ length: rows + 1 }, (_, i) => Math.round((i * h) / rows));
  const r = reference.data, f = current.data;
  const gain = new Float32Array(cells).fill(1);
  const texture = new Float32Array(cells);
  const trusted = new Uint8Array(cells);
  const maxCell = Math.max(...xs.slice(1).map((x, i) => x - xs[i])) * Math.max(...ys.slice(1).map((y, i) => y - ys[i]));
  const ratios = new Float64Array(maxCell), refs = new Float64Array(maxCell), scratch = new Float64Array(maxCell);
  const residuals = new Float64Array(256 * BINS + 1);
  let residualCount = 0;
  for (let cy = 0; cy < rows; cy++) {
    for (let cx = 0; cx < columns; cx++) {
      let n = 0, m = 0;
      for (let y = ys[cy]; y < ys[cy + 1]; y += STEP) {
        for (let x = xs[cx]; x < xs[cx + 1]; x += STEP) {
          const p = y * w + x;
          if (valid && !valid[p]) continue;
          refs[m++] = r[p];
          if (r[p] >= DARK && f[p] >= DARK && r[p] < BRIGHT && f[p] < BRIGHT) ratios[n++] = r[p] / f[p];
        }
      }
      const c = cy * columns + cx;
      if (n < 8 || n < 0.5 * m) continue;
      const g = Math.min(GAIN_LIMITS[1], Math.max(GAIN_LIMITS[0], selectKth(ratios.subarray(0, n), n >> 1, scratch)));
      gain[c] = g;
      texture[c] = selectKth(refs.subarray(0, m), Math.floor(0.9 * m), scratch) - selectKth(refs.subarray(0, m), Math.floor(0.1 * m), scratch);
      for (let y = ys[cy]; y < ys[cy + 1]; y += STEP) {
        for (let x = xs[cx]; x < xs[cx + 1]; x += STEP) {
          const p = y * w + x;
          if (valid && !valid[p]) continue;
          residuals[Math.min(256 * BINS, Math.round(BINS * Math.abs(r[p] - g * f[p])))]++;
          residualCount++;
        }
      }
    }
  }
  const none = (): ShadingField => ({ columns, rows, gain: new Float32Array(cells).fill(1), trusted: new Uint8Array(cells) });
  if (residualCount === 0) return none();
  // The residual's noise from its lower quartile, which cells with a subject or a sway barely
  // move; at least one grey level (quantisation).
  let q25 = 0;
  for (let acc = 0; q25 < residuals.length && (acc += residuals[q25]) < residualCount / 4; q25++);
  const sigma = Math.max(1, (Q25_TO_SIGMA * q25) / BINS);
  const limit = sigmas * sigma;
  // Trust a textured cell whose pixels mostly follow the field the cells' own gains make
  // (bilinear between centres, so the soft edge of a shadow crossing a cell still fits), and
  // refine its gain by least squares on those pixels.
  const provisional: ShadingField = { columns, rows, gain, trusted };
  const rowGain = new Float32Array(w);
  const follow = new Float64Array(cells), counted = new Float64Array(cells);
  const srg = new Float64Array(cells), sgg = new Float64Array(cells);
  const columnsAt = columnTaps(columns, w);
  let cy = 0;
  for (let y = 0; y < h; y += STEP) {
    while (y >= ys[cy + 1]) cy++;
    fieldRow(provisional, columnsAt, h, y, rowGain);
    let cx = 0;
    for (let x = 0; x < w; x += STEP) {
      while (x >= xs[cx + 1]) cx++;
      const p = y * w + x;
      if (valid && !valid[p]) continue;
      const c = cy * columns + cx;
      counted[c]++;
      const lit = rowGain[x] * f[p];
      if (Math.abs(r[p] - lit) > limit) continue;
      follow[c]++;
      srg[c] += r[p] * lit;
      sgg[c] += lit * lit;
    }
  }
  let left = cells;
  for (let c = 0; c < cells; c++) {
    if (texture[c] >= textureSigmas * sigma && counted[c] > 0 && follow[c] >= minFollowing * counted[c] && sgg[c] > 0) {
      trusted[c] = 1;
      gain[c] = Math.min(GAIN_LIMITS[1], Math.max(GAIN_LIMITS[0], gain[c] * (srg[c] / sgg[c])));
      left--;
    }
  }
  if (left === cells) return none();
  // Untrusted cells take the mean of their filled neighbours, ring by ring outwards from the
  // trusted ones: each gets the light of the nearest place that showed it.
  const out = Float32Array.from(gain);
  const filled = Uint8Array.from(trusted);
  while (left > 0) {
    const ring: Array<[number, number]> = [];
    for (let c = 0; c < cells; c++) {
      if (filled[c]) continue;
      const x = c % columns, y = (c - x) / columns;
      let n = 0, sum = 0;
      for (let dy = -1; dy <= 1; dy++) {
        for (let dx = -1; dx <= 1; dx++) {
          const xx = x + dx, yy = y + dy;
          if (xx < 0 || yy < 0 || xx >= columns || yy >= rows || !filled[yy * columns + xx]) continue;
          n++;
          sum += out[yy * columns + xx];
        }
      }
      if (n) ring.push([c, sum / n]);
    }
    for (const [c, g] of ring) {
      out[c] = g;
      filled[c] = 1;
    }
    left -= ring.length;
  }
  return { columns, rows, gain: out, trusted };
}

interface ColumnTaps {
  x0: Int32Array;
  x1: Int32Array;
  t: Float32Array;
}

/** For each pixel column, the two cell columns around it and the weight of the second. */
function columnTaps(columns: number, w: number): ColumnTaps {
  const x0 = new Int32Array(w), x1 = new Int32Array(w), t = new Float32Array(w);
  for (let x = 0; x < w; x++) {
    const fx = Math.min(columns - 1, Math.max(0, ((x + 0.5) * columns) / w - 0.5));
    x0[x] = Math.floor(fx);
    x1[x] = Math.min(columns - 1, x0[x] + 1);
    t[x] = fx - x0[x];
  }
  return { x0, x1, t };
}

/** The field's gain along row y, bilinear between cell centres (cell i's centre at (i + 0.5) * size). */
function fieldRow(field: ShadingField, taps: ColumnTaps, h: number, y: number, out: Float32Array): void {
  const { columns, rows, gain } = field;
  const fy = Math.min(rows - 1, Math.max(0, ((y + 0.5) * rows) / h - 0.5));
  const y0 = Math.floor(fy), y1 = Math.min(rows - 1, y0 + 1), ty = fy - y0;
  const top = y0 * columns, bottom = y1 * columns;
  for (let x = 0; x < out.length; x++) {
    const a = taps.x0[x], b = taps.x1[x], tx = taps.t[x];
    out[x] = (gain[top + a] * (1 - tx) + gain[top + b] * tx) * (1 - ty) + (gain[bottom + a] * (1 - tx) + gain[bottom + b] * tx) * ty;
  }
}

/** `current` relit by the field: each pixel times the field's gain there. */
export function applyShading(current: RgbFrame, field: ShadingField): RgbFrame {
  checkFrame('current', current, 3);
  const { width: w, height: h } = current;
  const out = makeRgb(w, h);
  const src = current.data, dst = out.data;
  const rowGain = new Float32Array(w);
  const taps = columnTaps(field.columns, w);
  for (let y = 0; y < h; y++) {
    fieldRow(field, taps, h, y, rowGain);
    for (let x = 0; x < w; x++) {
      const g = rowGain[x], p = (y * w + x) * 3;
      dst[p] = Math.min(255, Math.round(src[p] * g));
      dst[p + 1] = Math.min(255, Math.round(src[p + 1] * g));
      dst[p + 2] = Math.min(255, Math.round(src[p + 2] * g));
    }
  }
  return out;
}

/** True when the field changes anything (some gain off 1 by more than 1%). */
export function shadingMatters(field: ShadingField): boolean {
  for (const g of field.gain) if (Math.abs(g - 1) > 0.01) return true;
  return false;
}

/**
 * `frame` relit by the local shading that maps it onto the reference (given as its luma), kept
 * only when it makes the two agree better where most pixels are (median absolute luma
 * difference down by a tenth), so that a frame without such light is left exactly as it was.
 * Used on a burst's frames and its deployment background (analyse-event.ts). Not on each
 * neighbouring trigger before it is judged: relit against a reference that holds the animal, a
 * neighbour took up a large, low-contrast animal as light (DEVELOPERS.md). Returned with the
 * spread (shadeSpread) of the field it applied, 0 when it left the frame as it was.
 */
export function relightMeasured(referenceLuma: GreyFrame, frame: RgbFrame, valid?: Uint8Array): { frame: RgbFrame; spread: number } {
  const luma = toLuma(frame);
  const field = fitShading(referenceLuma, luma, valid);
  if (!shadingMatters(field)) return { frame, spread: 0 };
  const lit = applyShading(frame, field);
  return medianAbsLumaDiff(referenceLuma, toLuma(lit), valid) < 0.9 * medianAbsLumaDiff(referenceLuma, luma, valid) ? { frame: lit, spread: shadeSpread(field) } : { frame, spread: 0 };
}

/**
 * How unevenly a field relights the frame: the range of ln(gain) between the 10th and the 90th
 * percentile of its trusted cells (cells filled from their neighbours say nothing of their
 * own). A change of exposure or of the lamp's power moves every cell alike and spreads little;
 * a cloud shadow or moving shade over part of the scene spreads by the light's ratio between
 * shade and sun. 0 with fewer than four trusted cells.
 */
export function shadeSpread(field: ShadingField): number {
  const logs: number[] = [];
  field.gain.forEach((g, i) => {
    if (field.trusted[i]) logs.push(Math.log(g));
  });
  if (logs.length < 4) return 0;
  logs.sort((a, b) => a - b);
  return logs[Math.floor(0.9 * (logs.length - 1))] - logs[Math.floor(0.1 * (logs.length - 1))];
}
