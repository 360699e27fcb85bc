/**
 * Binary and hysteresis thresholds on a uint8 change image. Output: uint8 mask, 0 or 255.
 * thresholdBinary follows OpenCV's THRESH_BINARY (dst = src > thresh ? maxval : 0).
 * Hysteresis (Canny's idea, IEEE PAMI 1986, applied to regions): pixels above `high` seed a
 * region that grows through 8-connected pixels above `low`. Faint parts of a real subject
 * attach to its strong core, while isolated noise above `low` is dropped.
 */
import { invalidArgument } from '../shared/errors.js';
import { checkNumber } from '../shared/validate.js';
import { checkFrame, makeGrey, type GreyFrame } from './frame.js';

export function thresholdBinary(src: GreyFrame, thresh: number, maxval = 255): GreyFrame {
  checkFrame('src', src, 1);
  checkNumber('thresh', thresh, -1, 255);
  checkNumber('maxval', maxval, 0, 255);
  const out = makeGrey(src.width, src.height);
  const s = src.data;
  const d = out.data;
  // s > thresh  <=>  s >= floor(thresh) + 1 for integer s; the comparison as a sign mask, without
  // a branch (a change image crosses the threshold unpredictably).
  const last = Math.floor(thresh);
  for (let i = 0; i < s.length; i++) d[i] = ((last - s[i]) >> 31) & maxval;
  return out;
}

export function thresholdHysteresis(src: GreyFrame, low: number, high: number): GreyFrame {
  checkFrame('src', src, 1);
  checkNumber('low', low, 0, 255);
  checkNumber('high', high, 0, 255);
  if (low > high) throw invalidArgument('low', `number <= high (${high})`, low);
  const { width, height } = src;
  const out = makeGrey(width, height);
  const s = src.data;
  const d = out.data;
  const stack = new Int32Array(width * height);
  let top = 0;
  for (let i = 0; i < s.length; i++) {
    if (s[i] > high && d[i] === 0) {
      d[i] = 255;
      stack[top++] = i;
      while (top > 0) {
        const p = stack[--top];
        const x = p % width;
        const y = (p - x) / width;
        const x0 = x > 0 ? x - 1 : 0;
        const x1 = x < width - 1 ? x + 1 : x;
        const y0 = y > 0 ? y - 1 : 0;
        const y1 = y < height - 1 ? y + 1 : y;
        for (let yy = y0; yy <= y1; yy++) {
          for (let xx = x0; xx <= x1; xx++) {
            const q = yy * width + xx;
            if (d[q] === 0 && s[q] > low) {
              d[q] = 255;
              stack[top++] = q;
            }
          }
        }
      }
    }
  }
  return out;
}
