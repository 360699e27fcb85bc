/** Renders one frame per generator category into a PNG contact sheet, for a person to look at. */
import sharp from 'sharp';
import { ALL_CATEGORIES } from './scenes/categories.js';
import { renderScene } from './scenes/render.js';

const seed = Number(process.argv[2] ?? 1);
const out = process.argv[3] ?? 'contact-sheet.png';
const tiles = ALL_CATEGORIES.map((category, i) => {
  const s = renderScene({ seed: seed * 100 + i, category, width: 240, height: 135, frames: 4 });
  return s.frames[2];
});
const cols = 5;
const rows = Math.ceil(tiles.length / cols);
const W = 240 * cols, H = 135 * rows;
const sheet = Buffer.alloc(W * H * 3);
tiles.forEach((f, i) => {
  const ox = (i % cols) * 240, oy = Math.floor(i / cols) * 135;
  for (let y = 0; y < 135; y++) Buffer.from(f.data.buffer, y * 240 * 3, 240 * 3).copy(sheet, ((oy + y) * W + ox) * 3);
});
await sharp(sheet, { raw: { width: W, height: H, channels: 3 } }).png().toFile(out);
console.log(ALL_CATEGORIES.join(', '));
