/**
 * Paints an invented camera data strip on a frame: a flat bar along the top or bottom with
 * blocky glyphs for the time and frame counter, which change from frame to frame.
 */
import type { RgbFrame } from '../../src/kernels/frame.js';

const GLYPHS = ['111101101101111', '010110010010111', '111001111100111', '111001111001111', '101101111001001', '111100111001111', '111100111101111', '111001001001001', '111101111101111', '111101111001111'];

export interface StripStyle {
  /** 'both': the clock along the top, the counter and temperature along the bottom. */
  edge: 'top' | 'bottom' | 'both';
  /** Bar height as a share of the frame height. */
  share: number;
  bar: number;
  ink: number;
  /** A fixed logo block at the bar's right end (a moon or sun icon on many cameras). */
  icon?: boolean;
  /** 'spread': the text split into fields spaced along the whole bar, glyphs as tall as the bar
   *  allows, with fixed label blocks between fields (a camera name, a degree sign), as many
   *  cameras print it; absent, one short field at the left. */
  layout?: 'left' | 'spread';
}

/** Paints the strip; returns its height in rows (on each painted edge). */
export function paintStrip(f: RgbFrame, style: StripStyle, text: string): number {
  if (style.edge === 'both') {
    const half = Math.ceil(text.length / 2);
    paintBar(f, { ...style, edge: 'top' }, text.slice(0, half));
    return paintBar(f, { ...style, edge: 'bottom' }, text.slice(half));
  }
  return paintBar(f, { ...style, edge: style.edge }, text);
}

function paintBar(f: RgbFrame, style: StripStyle & { edge: 'top' | 'bottom' }, text: string): number {
  const h = Math.max(5, Math.round(f.height * style.share));
  const y0 = style.edge === 'top' ? 0 : f.height - h;
  for (let y = y0; y < y0 + h; y++) for (let x = 0; x < f.width; x++) f.data.fill(style.bar, (y * f.width + x) * 3, (y * f.width + x) * 3 + 3);
  const px = Math.max(1, Math.floor((h - 2) / 5));
  const ink = (x: number, y: number): void => {
    if (x >= 0 && y >= 0 && x < f.width && y < f.height) f.data.fill(style.ink, (y * f.width + x) * 3, (y * f.width + x) * 3 + 3);
  };
  const glyphs = (from: number, chars: string): number => {
    let cx = from;
    for (const ch of chars) {
      const g = GLYPHS[Number(ch)];
      if (g) {
        for (let gy = 0; gy < 5; gy++) for (let gx = 0; gx < 3; gx++) {
          if (g[gy * 3 + gx] !== '1') continue;
          for (let yy = 0; yy < px; yy++) for (let xx = 0; xx < px; xx++) ink(cx + gx * px + xx, y0 + 1 + gy * px + yy);
        }
      }
      cx += 4 * px;
    }
    return cx;
  };
  if (style.layout === 'spread') {
    // Four fields (date, temperature, time, counter) padded to fill the bar's width, each
    // followed by a fixed label block of two glyph widths.
    const field = Math.max(1, Math.ceil(text.length / 4));
    const stride = Math.floor(f.width / 4);
    for (let k = 0; k < 4; k++) {
      const chars = text.slice(k * field, (k + 1) * field).padEnd(Math.max(3, Math.floor((stride - 12 * px) / (4 * px))), String((k * 3 + 1) % 10));
      const end = glyphs(2 + k * stride, chars);
      for (let y = y0 + 1 + px; y < y0 + 1 + 4 * px; y++) for (let x = end; x < end + 2 * px && x < (k + 1) * stride; x++) ink(x, y);
    }
  } else glyphs(2, text);
  if (style.icon) {
    const size = Math.max(2, h - 2);
    for (let y = y0 + 1; y < y0 + 1 + size && y < f.height; y++) for (let x = f.width - size - 3; x < f.width - 3; x++) f.data.fill(style.ink, (y * f.width + x) * 3, (y * f.width + x) * 3 + 3);
  }
  return h;
}
