/** `movesift cut <ledger> --out <folder> [--exact]`: each clip's activity windows as separate files. */
import path from 'node:path';
import { parse } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { openLedger } from '../ledger/open-ledger.js';
import { clipWindows } from '../ledger/export-rows.js';
import { cutWindows } from '../pipeline/cut-windows.js';

export const CUT_HELP = `Usage: movesift cut <ledger> --out <folder> [--exact]

Writes each clip's activity windows as separate files into the folder, with windows-index.csv
(source clip, window, start, end, score, file) and maxn-sheet.csv (one row per window, with
empty species, MaxN and time-of-MaxN columns to fill in while watching). The originals are only read.

By default the windows are stream copies: fast and lossless, but a copy can only start at a
keyframe, so each file may begin up to one keyframe interval before its window (never after).
--exact re-encodes (H.264) so every file starts and ends where its window does.`;

export async function cutCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ out?: string; exact?: boolean }>(argv, { out: { type: 'string' }, exact: { type: 'boolean' } }, 'cut');
  if (values.help) return console.log(CUT_HELP), ExitCode.done;
  if (positionals.length !== 1) throw usageError('cut: give exactly one ledger. See `movesift cut --help`.');
  if (!values.out) throw usageError('cut: --out <folder> is required.');
  const db = openLedger(positionals[0]);
  let rows;
  try {
    rows = clipWindows(db);
  } finally {
    db.close();
  }
  if (!rows.length) return console.log('No clip in this ledger has an activity window; nothing to cut.'), ExitCode.done;
  const clips = rows.map((r) => ({ eventId: r.event_id, source: path.join(r.root, r.rel_path), display: r.rel_path, windows: JSON.parse(r.windows) }));
  const files = await cutWindows(clips, values.out, !!values.exact, (f) => console.log(`  ${f.source} ${f.start_s.toFixed(1)}-${f.end_s.toFixed(1)} s -> ${f.file}`));
  console.log(`Wrote ${files.length} window file(s), windows-index.csv and maxn-sheet.csv to ${values.out}.`);
  return ExitCode.done;
}
