/**
 * A card of hostile entries from a fixed seed, for the torture run (tools/torture.ts) and its
 * slice in the tests: damaged copies of the project's own sample media (truncated, bytes
 * flipped, headers that lie about size or length, broken MP4 boxes), pixel and decompression
 * bombs, odd names and entries that are not regular files, mixed with whole files so that the
 * card also has events to screen. Every entry is listed with what was done to it, so a check can
 * say which kind of entry went missing.
 */
import { mkdirSync, readFileSync, symlinkSync, writeFileSync, linkSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import { createDeflate } from 'node:zlib';
import { pipeline } from 'node:stream/promises';
import { Readable, Writable } from 'node:stream';
import path from 'node:path';
import { mulberry32 } from '../../src/shared/stats/seeded-random.js';

export interface FuzzEntry {
  /** Relative to the card, '/'-separated. */
  rel: string;
  kind: string;
}

const SAMPLE = path.resolve(import.meta.dirname, '../../sample-media');

// CRC-32 (ISO 3309, the one PNG chunks carry: PNG specification, section 5.5).
const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});
function crc32(b: Uint8Array): number {
  let c = 0xffffffff;
  for (const x of b) c = CRC_TABLE[(c ^ x) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}
function pngChunk(type: string, data: Buffer): Buffer {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  const td = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(td));
  return Buffer.concat([len, td, crc]);
}
function ihdr(width: number, height: number, colourType: number): Buffer {
  const d = Buffer.alloc(13);
  d.writeUInt32BE(width, 0);
  d.writeUInt32BE(height, 4);
  d[8] = 8; // bit depth
  d[9] = colourType; // 0 grey, 2 RGB
  return pngChunk('IHDR', d);
}
const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

/** A real greyscale PNG of `side`² zero pixels: a few hundred kB on disk, side² bytes decoded. */
async function decompressionBomb(side: number): Promise<Buffer> {
  const row = Buffer.alloc(side + 1); // filter byte 0, then zeros
  let y = 0;
  const rows = new Readable({
    read() {
      this.push(y++ < side ? row : null);
    },
  });
  const parts: Buffer[] = [];
  await pipeline(rows, createDeflate({ level: 9 }), new Writable({ write: (c, _e, cb) => (parts.push(c as Buffer), cb()) }));
  return Buffer.concat([PNG_SIGNATURE, ihdr(side, side, 0), pngChunk('IDAT', Buffer.concat(parts)), pngChunk('IEND', Buffer.alloc(0))]);
}

/** The JPEG's first SOF marker's offset (baseline or progressive), where height and width follow. */
function sofOffset(jpeg: Buffer): number {
  for (let i = 2; i < jpeg.length - 9; ) {
    if (jpeg[i] !== 0xff) return -1;
    const m = jpeg[i + 1];
    if (m === 0xc0 || m === 0xc2) return i;
    i += 2 + jpeg.readUInt16BE(i + 2);
  }
  return -1;
}

/** Offsets of every top-level and nested MP4 box named `type` (ISO/IEC 14496-12 box layout). */
function boxes(mp4: Buffer, type: string): number[] {
  const out: number[] = [];
  for (let i = 0; i + 8 <= mp4.length; i++) if (mp4.toString('latin1', i + 4, i + 8) === type) out.push(i);
  return out;
}

/**
 * Writes about `count` entries under `dir` (at least one of every kind) and returns what each is.
 * The same seed writes the same card.
 */
export async function writeFuzzCard(dir: string, count: number, seed: number): Promise<FuzzEntry[]> {
  const rnd = mulberry32(seed);
  const pick = <T>(a: readonly T[]): T => a[Math.floor(rnd() * a.length)];
  const int = (lo: number, hi: number): number => lo + Math.floor(rnd() * (hi - lo + 1));
  const jpegs = ['ridge-trail', 'creek-bend'].flatMap((d) => Array.from({ length: 32 }, (_, i) => path.join(SAMPLE, d, `IMG_${String(i + 1).padStart(4, '0')}.JPG`)));
  const jpeg = (): Buffer => Buffer.from(readFileSync(pick(jpegs)));
  const mp4 = readFileSync(path.join(SAMPLE, 'reef-station/reef-drop-01.mp4'));
  const entries: FuzzEntry[] = [];
  const folders = ['cam-a', 'cam-b/100MEDIA', 'cam-c', 'odd names'];
  for (const f of folders) mkdirSync(path.join(dir, f), { recursive: true });
  let n = 0;
  const put = (kind: string, name: string, data?: Buffer | string): string => {
    const rel = `${pick(folders)}/${String(n++).padStart(4, '0')}-${name}`;
    if (data !== undefined) writeFileSync(path.join(dir, rel), data);
    entries.push({ rel, kind });
    return rel;
  };
  const bomb = await decompressionBomb(15000); // 225 MP: under sharp's default pixel limit, so it is decoded
  const makers: Array<() => void> = [
    () => put('whole', 'whole.JPG', jpeg()),
    () => {
      const b = jpeg();
      put('truncated', 'truncated.JPG', b.subarray(0, int(2, b.length - 2)));
    },
    () => {
      const b = jpeg();
      for (let k = int(1, 60); k > 0; k--) b[int(b.length >> 3, b.length - 3)] ^= 1 << int(0, 7);
      put('flipped', 'flipped.JPG', b);
    },
    () => {
      const b = jpeg();
      const at = sofOffset(b);
      if (at > 0) {
        b.writeUInt16BE(int(40000, 65500), at + 5); // height
        b.writeUInt16BE(int(40000, 65500), at + 7); // width
      }
      put('lying-jpeg-size', 'pixel-bomb.JPG', b);
    },
    () => {
      // A PNG header that claims a vast image over a few bytes of data (a pixel bomb by header).
      put('lying-png-size', 'huge.png', Buffer.concat([PNG_SIGNATURE, ihdr(int(100000, 2000000), int(100000, 2000000), 2), pngChunk('IDAT', Buffer.from([0x78, 0x9c, 0x03, 0x00, 0x00, 0x00, 0x00, 0x01])), pngChunk('IEND', Buffer.alloc(0))]));
    },
    () => put('decompression-bomb', 'zeros.png', bomb),
    () => put('whole-clip', 'clip.mp4', mp4),
    () => put('truncated-clip', 'cut.mp4', mp4.subarray(0, int(16, mp4.length - 16))),
    () => {
      const b = Buffer.from(mp4);
      const at = pick([...boxes(b, 'moov'), ...boxes(b, 'mdat'), ...boxes(b, 'trak'), ...boxes(b, 'stsz')]);
      if (at !== undefined) b.writeUInt32BE(pick([0, 1, 7, 0xffffffff, int(8, 1 << 30)]), at);
      put('broken-mp4-box', 'box.mp4', b);
    },
    () => {
      // mvhd's duration (version 0: 4-byte timescale at +20, duration at +24) set to hours.
      const b = Buffer.from(mp4);
      for (const at of boxes(b, 'mvhd')) b.writeUInt32BE(b.readUInt32BE(at + 20) * int(3600, 36000), at + 24);
      put('lying-mp4-duration', 'long.mp4', b);
    },
    () => {
      const b = Buffer.from(mp4);
      for (let k = int(1, 200); k > 0; k--) b[int(64, b.length - 1)] ^= 0xff;
      put('flipped-clip', 'noise.mp4', b);
    },
    () => put('empty', 'empty.JPG', ''),
    () => put('not-media-by-content', 'letter.jpg', 'This is a letter, not a photograph.\n'),
    () => put('not-media-by-name', 'notes.txt', 'deployment notes\n'),
    () => put('odd-name', pick(['Élan ñandú.JPG', 'E\u0301lan.JPG', 'a b  c.JPG', '-dash.JPG', 'new\nline.JPG', `${'x'.repeat(180)}.JPG`, 'emoji 🦊.jpeg', 'UPPER.JPEG', 'tab\tname.jpg', 'quote"\'.JPG']), jpeg()),
    () => {
      const rel = put('fifo', 'pipe.JPG');
      execFileSync('mkfifo', [path.join(dir, rel)]);
    },
    () => {
      const rel = put('folder-named-like-media', 'folder.JPG');
      mkdirSync(path.join(dir, rel));
      entries.pop(); // a folder is walked, not an entry: what is inside it counts instead
      writeFileSync(path.join(dir, rel, 'inside.JPG'), jpeg());
      entries.push({ rel: `${rel}/inside.JPG`, kind: 'whole' });
    },
    () => {
      const rel = put('dangling-link', 'gone.JPG');
      symlinkSync('no-such-file.JPG', path.join(dir, rel));
    },
    () => {
      const a = put('link-loop', 'loop-a.JPG');
      const b = put('link-loop', 'loop-b.JPG');
      symlinkSync(path.basename(b), path.join(dir, a));
      symlinkSync(path.basename(a), path.join(dir, b));
      // Both in the same folder only when pick() chose it twice; otherwise each dangles, which is the same outcome.
    },
    () => {
      const target = entries.find((e) => e.kind === 'whole');
      if (!target) return;
      const rel = put('hard-link', 'same-bytes.JPG');
      linkSync(path.join(dir, target.rel), path.join(dir, rel));
    },
    () => {
      const rel = `${pick(folders)}/.${String(n++).padStart(4, '0')}-hidden.JPG`;
      writeFileSync(path.join(dir, rel), jpeg());
      entries.push({ rel, kind: 'hidden' });
    },
  ];
  // One of each first, then a seeded mix weighted toward damaged and whole media.
  for (const m of makers) m();
  const weighted = [0, 0, 0, 1, 1, 2, 2, 2, 3, 4, 5, 6, 7, 8, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20];
  while (entries.length < count) makers[pick(weighted)]();
  return entries;
}
