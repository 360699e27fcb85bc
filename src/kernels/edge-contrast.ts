/**
 * How sharply a blob's change stops at its edge. An object in focus (an animal, a fish) has a
 * crisp outline: just inside it the change is strong, just outside it falls to the noise. A
 * change of light (lamp, cloud, sun through water) or an out-of-focus insect on the lens fades
 * out gradually: the pixels just outside still carry much of the change that just inside does.
 *
 * Returns 1 - (mean change on the outer ring) / (mean change on the inner ring), clamped to
 * 0..1, where the inner ring is the blob's pixels with a 4-neighbour outside it and the outer
 * ring the pixels outside it with a 4-neighbour inside (image borders are not an edge). Change
 * is the SNR image the blob was found in, so the measure does not depend on the noise level.
 */
import type { Blob } from './components.js';
import type { GreyFrame } from './frame.js';

export function edgeContrast(snr: GreyFrame, labels: Int32Array, blob: Blob): number {
  const { width: w, height: h } = snr;
  const s = snr.data;
  const l = blob.label;
  const x0 = Math.max(0, blob.x - 1), x1 = Math.min(w - 1, blob.x + blob.width);
  const y0 = Math.max(0, blob.y - 1), y1 = Math.min(h - 1, blob.y + blob.height);
  let inSum = 0, inN = 0, outSum = 0, outN = 0;
  for (let y = y0; y <= y1; y++) {
    for (let x = x0; x <= x1; x++) {
      const p = y * w + x;
      const inside = labels[p] === l;
      // Is any 4-neighbour (inside the image) on the other side of the outline?
      let across = false;
      if (x > 0 && (labels[p - 1] === l) !== inside) across = true;
      else if (x < w - 1 && (labels[p + 1] === l) !== inside) across = true;
      else if (y > 0 && (labels[p - w] === l) !== inside) across = true;
      else if (y < h - 1 && (labels[p + w] === l) !== inside) across = true;
      if (!across) continue;
      if (inside) {
        inSum += s[p];
        inN++;
      } else {
        outSum += s[p];
        outN++;
      }
    }
  }
  if (inN === 0 || inSum <= 0) return 0;
  if (outN === 0) return 1;
  return Math.max(0, Math.min(1, 1 - outSum / outN / (inSum / inN)));
}
