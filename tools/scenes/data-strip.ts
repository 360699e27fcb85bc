/**
 * Paints an invented camera data strip on a frame: a flat bar along the top or bottom with
 * blocky glyphs for the time and frame counter, which change from frame to frame.
 */
import type { RgbFrame } from '../../src/kernels/frame.js';

const GLYPHS = ['111101101101111', '010110010010111', '111001111100111', '111001111001111', '101101111001001', '111100111001111', '111100111101111', '111001001001001', '111101111101111', '111101111001111'];

export interface StripStyle {
  edge: 'top' | 'bottom';
  /** Bar height as a share of the frame height. */
  share: number;
  bar: number;
  ink: number;
}

export function paintStrip(f: RgbFrame, style: StripStyle, text: string): number {
  const h = Math.max(5, Math.round(f.height * style.share));
  const y0 = style.edge === 'top' ? 0 : f.height - h;
  for (let y = y0; y < y0 + h; y++) for (let x = 0; x < f.width; x++) f.data.fill(style.bar, (y * f.width + x) * 3, (y * f.width + x) * 3 + 3);
  const px = Math.max(1, Math.floor((h - 2) / 5));
  let cx = 2;
  for (const ch of text) {
    const g = GLYPHS[Number(ch)];
    if (g) {
      for (let gy = 0; gy < 5; gy++) for (let gx = 0; gx < 3; gx++) {
        if (g[gy * 3 + gx] !== '1') continue;
        for (let yy = 0; yy < px; yy++) for (let xx = 0; xx < px; xx++) {
          const x = cx + gx * px + xx, y = y0 + 1 + gy * px + yy;
          if (x < f.width && y < f.height) f.data.fill(style.ink, (y * f.width + x) * 3, (y * f.width + x) * 3 + 3);
        }
      }
    }
    cx += 4 * px;
  }
  return h;
}
