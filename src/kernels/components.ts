/**
 * Connected components of a binary mask with 8-connectivity, and per-component statistics.
 * Two-pass labelling with union-find (Rosenfeld and Pfaltz, JACM 1966; path-compressed
 * equivalence table as in Wu, Otoo and Suzuki, PAA 2009). Labels are 1..count, numbered in
 * raster order of each component's first pixel; 0 is background.
 */
import { checkFrame, checkSameShape, type GreyFrame } from './frame.js';

export interface Blob {
  label: number;
  area: number;
  x: number;
  y: number;
  width: number;
  height: number;
  cx: number;
  cy: number;
  /** Mean and peak of the change image over the blob's pixels (0 when no change image given). */
  meanChange: number;
  peakChange: number;
  /** Share of the blob's pixels that neither a small local shift nor a local light change of the
   *  reference explains (explained-change.ts); set by the event and clip chains. */
  unexplained?: number;
  /** How sharply the change stops at the blob's outline, 0..1 (edge-contrast.ts); set by the
   *  event and clip chains. */
  edge?: number;
}

export interface Components {
  width: number;
  height: number;
  labels: Int32Array;
  count: number;
  blobs: Blob[];
}

function find(parent: Int32Array, a: number): number {
  let r = a;
  while (parent[r] !== r) r = parent[r];
  while (parent[a] !== r) {
    const n = parent[a];
    parent[a] = r;
    a = n;
  }
  return r;
}

function union(parent: Int32Array, a: number, b: number): number {
  const ra = find(parent, a);
  const rb = find(parent, b);
  if (ra < rb) {
    parent[rb] = ra;
    return ra;
  }
  parent[ra] = rb;
  return rb;
}

export function labelComponents(mask: GreyFrame, change?: GreyFrame): Components {
  checkFrame('mask', mask, 1);
  if (change) {
    checkFrame('change', change, 1);
    checkSameShape('mask', mask, 'change', change);
  }
  const { width: w, height: h } = mask;
  const m = mask.data;
  const labels = new Int32Array(w * h);
  // Provisional labels: at most one per two pixels in a row plus one, per row.
  const parent = new Int32Array(((w + 1) >> 1) * ((h + 1) >> 1) * 2 + 2);
  let next = 1;
  // Masks are mostly empty: where four aligned mask bytes are all zero (one 32-bit word), skip
  // them together. Labels there stay 0, as the byte-by-byte path would leave them.
  const m32 = m.byteOffset % 4 === 0 ? new Uint32Array(m.buffer, m.byteOffset, m.length >> 2) : undefined;
  for (let y = 0; y < h; y++) {
    const r = y * w;
    for (let x = 0; x < w; x++) {
      const i = r + x;
      if (m32 && (i & 3) === 0 && x + 3 < w && m32[i >> 2] === 0) {
        x += 3;
        continue;
      }
      if (m[i] === 0) continue;
      let l = 0;
      if (y > 0) {
        const up = i - w;
        if (x > 0 && labels[up - 1]) l = labels[up - 1];
        if (labels[up]) l = l ? union(parent, l, labels[up]) : labels[up];
        if (x < w - 1 && labels[up + 1]) l = l ? union(parent, l, labels[up + 1]) : labels[up + 1];
      }
      if (x > 0 && labels[i - 1]) l = l ? union(parent, l, labels[i - 1]) : labels[i - 1];
      if (l === 0) {
        l = next++;
        parent[l] = l;
      }
      labels[i] = l;
    }
  }
  // Final labels in order of the smallest provisional label of each set = raster order.
  const final = new Int32Array(next);
  let count = 0;
  for (let l = 1; l < next; l++) {
    const root = find(parent, l);
    if (root === l) final[l] = ++count;
    else final[l] = final[root];
  }
  const area = new Float64Array(count + 1);
  const sx = new Float64Array(count + 1);
  const sy = new Float64Array(count + 1);
  const sc = new Float64Array(count + 1);
  const pk = new Float64Array(count + 1);
  const x0 = new Int32Array(count + 1).fill(w);
  const y0 = new Int32Array(count + 1).fill(h);
  const x1 = new Int32Array(count + 1).fill(-1);
  const y1 = new Int32Array(count + 1).fill(-1);
  const c = change?.data;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const i = y * w + x;
      if (m32 && (i & 3) === 0 && x + 3 < w && m32[i >> 2] === 0) {
        x += 3;
        continue;
      }
      if (labels[i] === 0) continue;
      const l = final[labels[i]];
      labels[i] = l;
      area[l]++;
      sx[l] += x;
      sy[l] += y;
      if (x < x0[l]) x0[l] = x;
      if (x > x1[l]) x1[l] = x;
      if (y < y0[l]) y0[l] = y;
      if (y > y1[l]) y1[l] = y;
      if (c) {
        sc[l] += c[i];
        if (c[i] > pk[l]) pk[l] = c[i];
      }
    }
  }
  const blobs: Blob[] = [];
  for (let l = 1; l <= count; l++) {
    blobs.push({
      label: l,
      area: area[l],
      x: x0[l],
      y: y0[l],
      width: x1[l] - x0[l] + 1,
      height: y1[l] - y0[l] + 1,
      cx: sx[l] / area[l],
      cy: sy[l] / area[l],
      meanChange: sc[l] / area[l],
      peakChange: pk[l],
    });
  }
  return { width: w, height: h, labels, count, blobs };
}
