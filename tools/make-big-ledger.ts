/**
 * Makes a ledger of many events for measuring the review grid: scans sample-media, then copies
 * its events to the target count (`src/ledger/synthetic-fill.ts`).
 *   tsx tools/make-big-ledger.ts --out /tmp/big.ledger [--events 100000]
 */
import { existsSync, rmSync } from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { openLedger } from '../src/ledger/open-ledger.js';
import { fillSynthetic } from '../src/ledger/synthetic-fill.js';
import { scan } from '../src/pipeline/scan.js';

export async function makeBigLedger(out: string, events: number): Promise<void> {
  for (const f of [out, `${out}-wal`, `${out}-shm`]) if (existsSync(f)) rmSync(f);
  await scan({ roots: [path.resolve(import.meta.dirname, '../sample-media')], ledger: out, workers: 1 });
  const db = openLedger(out);
  try {
    fillSynthetic(db, events);
  } finally {
    db.close();
  }
}

if (process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename)) {
  const { values } = parseArgs({ options: { out: { type: 'string' }, events: { type: 'string', default: '100000' } } });
  if (!values.out) throw new Error('--out <file> is required');
  const t0 = Date.now();
  await makeBigLedger(values.out, Number(values.events));
  console.log(`${values.out}: ${values.events} events in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
}
