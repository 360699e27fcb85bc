/**
 * How much of a blob's change the scene itself can explain. A swaying branch, surging kelp or a
 * shaken camera moves the background a few pixels: each changed pixel matches a reference pixel
 * close by. A lamp, a cloud or the sun changes brightness smoothly: the change inside the blob
 * follows the brightness change around it. An animal is neither: its pixels match nothing
 * nearby in the reference and do not follow the light around them.
 *
 * For each pixel of the blob: the shift residual is the smallest, over displacements of up to
 * `radius` px, of the largest channel difference between the frame and the displaced reference
 * (the displacement-compensated difference of block-matching motion estimation, evaluated per
 * pixel); the light residual is the largest channel difference from the reference mapped by a
 * per-channel gain and offset fitted by least squares on a ring of pixels around the blob. A
 * pixel is unexplained when both exceed `k` noise sigmas. Returns the unexplained share of the
 * blob's pixels, 0..1.
 */
import type { Blob } from './components.js';
import type { RgbFrame } from './frame.js';

export function unexplainedShare(frame: RgbFrame, ref: RgbFrame, labels: Int32Array, blob: Blob, sigma: number, radius = 3, k = 3): number {
  const { width: w, height: h } = frame;
  const F = frame.data, R = ref.data;
  const limit = k * Math.max(sigma, 0.5);
  const pad = Math.max(3, Math.round(0.5 * Math.sqrt(blob.area)));
  const x0 = Math.max(0, blob.x - pad), x1 = Math.min(w - 1, blob.x + blob.width - 1 + pad);
  const y0 = Math.max(0, blob.y - pad), y1 = Math.min(h - 1, blob.y + blob.height - 1 + pad);
  // Light: F = a R + b per channel, from the ring (the padded box outside any blob of this label).
  const gain = [1, 1, 1], offset = [0, 0, 0];
  for (let c = 0; c < 3; c++) {
    let n = 0, sr = 0, sf = 0, srr = 0, srf = 0;
    for (let y = y0; y <= y1; y++) {
      for (let x = x0; x <= x1; x++) {
        const p = y * w + x;
        if (labels[p] === blob.label) continue;
        const r = R[p * 3 + c], f = F[p * 3 + c];
        n++;
        sr += r;
        sf += f;
        srr += r * r;
        srf += r * f;
      }
    }
    if (n < 8) continue;
    const vr = srr / n - (sr / n) ** 2;
    // A flat ring cannot tell gain from offset: fit the offset alone.
    gain[c] = vr > 4 ? (srf / n - (sr / n) * (sf / n)) / vr : 1;
    offset[c] = sf / n - gain[c] * (sr / n);
  }
  let unexplained = 0;
  const bx1 = blob.x + blob.width, by1 = blob.y + blob.height;
  for (let y = blob.y; y < by1; y++) {
    for (let x = blob.x; x < bx1; x++) {
      const p = y * w + x;
      if (labels[p] !== blob.label) continue;
      const i = p * 3;
      const f0 = F[i], f1 = F[i + 1], f2 = F[i + 2];
      const light = Math.max(Math.abs(f0 - (gain[0] * R[i] + offset[0])), Math.abs(f1 - (gain[1] * R[i + 1] + offset[1])), Math.abs(f2 - (gain[2] * R[i + 2] + offset[2])));
      if (light <= limit) continue;
      let best = Infinity;
      for (let dy = -radius; dy <= radius && best > limit; dy++) {
        const yy = y + dy;
        if (yy < 0 || yy >= h) continue;
        for (let dx = -radius; dx <= radius; dx++) {
          const xx = x + dx;
          if (xx < 0 || xx >= w) continue;
          const j = (yy * w + xx) * 3;
          let d = f0 - R[j];
          let m = d < 0 ? -d : d;
          d = f1 - R[j + 1];
          if (d < 0) d = -d;
          if (d > m) m = d;
          d = f2 - R[j + 2];
          if (d < 0) d = -d;
          if (d > m) m = d;
          if (m < best) best = m;
          if (best <= limit) break;
        }
      }
      if (best > limit) unexplained++;
    }
  }
  return blob.area > 0 ? unexplained / blob.area : 0;
}
