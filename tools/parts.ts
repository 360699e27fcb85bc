/**
 * Splits a fitting script's scene work across processes (this machine has two cores and the
 * engine is single-threaded JavaScript): the script runs itself once per part with its own
 * arguments and `--part i/n <file>`, each child writes its share as JSON, the parent merges
 * them in order.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const TSX = path.resolve(import.meta.dirname, '../node_modules/tsx/dist/cli.mjs');

/** In a child: does its share and exits. In the parent: returns every part's results, part by part. */
export async function inParts<T>(script: string, work: (part: number, parts: number) => Promise<T[]>, parts = Math.max(1, os.availableParallelism())): Promise<T[]> {
  const at = process.argv.indexOf('--part');
  if (at > 0) {
    const [i, n] = process.argv[at + 1].split('/').map(Number);
    fs.writeFileSync(process.argv[at + 2], JSON.stringify(await work(i, n)));
    process.exit(0);
  }
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'movesift-parts-'));
  try {
    await Promise.all(
      Array.from({ length: parts }, (_, i) =>
        new Promise<void>((res, rej) => {
          // The parent's own arguments too, so that a child draws up the same work list.
          const c = spawn(process.execPath, [TSX, script, ...process.argv.slice(2), '--part', `${i}/${parts}`, path.join(dir, `${i}.json`)], { stdio: 'inherit', env: process.env });
          c.on('exit', (code) => (code === 0 ? res() : rej(new Error(`part ${i} of ${script} exited ${code}`))));
        }),
      ),
    );
    const out: T[] = [];
    for (let i = 0; i < parts; i++) out.push(...(JSON.parse(fs.readFileSync(path.join(dir, `${i}.json`), 'utf8')) as T[]));
    return out;
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
