/**
 * BT.601 luma (ITU-R BT.601: Y' = 0.299 R' + 0.587 G' + 0.114 B') in 16-bit fixed point, against
 * the floating-point formula rounded, over all 16.7 million 8-bit colours: equal for 99.9% of
 * them and never more than one level apart (the fixed-point weights differ from the exact ones by
 * under 4e-6). The primaries and greys are exact.
 */
import { describe, expect, it } from 'vitest';
import { makeRgb } from '../../src/kernels/frame.js';
import { toLuma } from '../../src/kernels/luma.js';

describe('toLuma', () => {
  it('matches the BT.601 formula over every 8-bit colour to within one level', () => {
    const f = makeRgb(256 * 256, 1);
    let differ = 0;
    for (let r = 0; r < 256; r++) {
      for (let g = 0; g < 256; g++) for (let b = 0; b < 256; b++) f.data.set([r, g, b], (g * 256 + b) * 3);
      const y = toLuma(f).data;
      for (let g = 0; g < 256; g++) {
        for (let b = 0; b < 256; b++) {
          const d = Math.abs(y[g * 256 + b] - Math.round(0.299 * r + 0.587 * g + 0.114 * b));
          if (d > 1) throw new Error(`(${r}, ${g}, ${b}) off by ${d}`);
          differ += d;
        }
      }
    }
    expect(differ / 256 ** 3).toBeLessThan(0.001);
    const p = makeRgb(5, 1);
    p.data.set([255, 0, 0, 0, 255, 0, 0, 0, 255, 128, 128, 128, 255, 255, 255]);
    expect([...toLuma(p).data]).toEqual([76, 150, 29, 128, 255]);
  });
});
