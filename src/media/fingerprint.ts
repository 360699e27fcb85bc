/**
 * Content fingerprint: SHA-256 over the size and the first and last 64 KiB. Enough to tell a
 * rewritten or replaced file from an unchanged one without reading tens of gigabytes at every
 * rerun (common practice for media catalogues; a full hash is taken only when media are moved,
 * by apply). The size is part of the input, so a truncated copy never matches.
 */
import { createHash } from 'node:crypto';
import { promises as fs } from 'node:fs';

const PART = 64 * 1024;

export interface FileFacts {
  size: number;
  mtimeMs: number;
  fingerprint: string;
}

export async function fingerprintFile(abs: string): Promise<FileFacts> {
  const fh = await fs.open(abs, 'r');
  try {
    const st = await fh.stat();
    const h = createHash('sha256');
    h.update(`${st.size}:`);
    const head = Buffer.alloc(Math.min(PART, st.size));
    await fh.read(head, 0, head.length, 0);
    h.update(head);
    if (st.size > PART) {
      const tailLen = Math.min(PART, st.size - PART);
      const tail = Buffer.alloc(tailLen);
      await fh.read(tail, 0, tailLen, st.size - tailLen);
      h.update(tail);
    }
    return { size: st.size, mtimeMs: Math.floor(st.mtimeMs), fingerprint: h.digest('hex').slice(0, 32) };
  } finally {
    await fh.close();
  }
}
