/** `movesift apply <ledger> --to <folder> [--dry-run] [--copy]` and `movesift undo <ledger> [--apply <id>] [--list]`. */
import os from 'node:os';
import { parse, numberFlag } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { applyDecisions, type ApplySummary } from '../pipeline/apply.js';
import { undoApply } from '../pipeline/undo-apply.js';
import { openLedger } from '../ledger/open-ledger.js';
import { createMoveStore } from '../ledger/move-store.js';

export const APPLY_HELP = `Usage: movesift apply <ledger> --to <folder> [--dry-run] [--copy]

Moves the media of every set-aside event into the set-aside folder, below a folder named after
its scan root, keeping its path. Each move is journalled in the ledger before and after it
happens and checked (SHA-256 when it crosses disks), so \`movesift undo\` can put everything back
and a crash is finished or reversed by the next run. Nothing is ever overwritten or deleted.
Checked first: the folder is outside every scanned folder, no name there is taken, the disk has
room. A file changed since it was screened is left in place and listed.

Options:
  --to <folder>    the set-aside folder                                     required
  --dry-run        list what would move and how many bytes; move nothing
  --copy           copy instead of moving (the originals stay)
  --who <name>     recorded with the apply                                  default: the user name
  -h, --help       this text`;

export const UNDO_HELP = `Usage: movesift undo <ledger> [--apply <id>] [--events <id,...>] [--list]

Puts back every file that apply moved (all applies, or one), each checked against the SHA-256
taken before it moved. A file changed while set aside is left where it is and listed.

Options:
  --apply <id>     undo only this apply
  --events <ids>   put back only these events' files (comma-separated event ids: events kept
                   after their files were set aside)
  --list           list the applies and how many files each has in the set-aside folder
  -h, --help       this text`;

const mb = (b: number): string => `${(b / 1e6).toFixed(1)} MB`;

function printPlan(s: ApplySummary, to: string): void {
  const events = new Set(s.planned.map((p) => p.candidate.event_id)).size;
  console.log(`${s.dryRun ? 'Would move' : 'Moving'} ${s.planned.length} file(s), ${mb(s.bytes)}, of ${events} set-aside event(s) into ${to}:`);
  for (const p of s.planned.slice(0, 20)) console.log(`  ${p.source} -> ${p.dest}`);
  if (s.planned.length > 20) console.log(`  ... and ${s.planned.length - 20} more`);
}

export async function applyCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ to?: string; 'dry-run'?: boolean; copy?: boolean; who?: string }>(argv, { to: { type: 'string' }, 'dry-run': { type: 'boolean' }, copy: { type: 'boolean' }, who: { type: 'string' } }, 'apply');
  if (values.help) return console.log(APPLY_HELP), ExitCode.done;
  if (positionals.length !== 1) throw usageError('apply: give exactly one ledger. See `movesift apply --help`.');
  if (!values.to) throw usageError('apply: --to <folder> is required (where set-aside media go). See `movesift apply --help`.');
  const s = await applyDecisions({ ledger: positionals[0], to: values.to, dryRun: !!values['dry-run'], copy: !!values.copy, who: values.who ?? os.userInfo().username });
  if (s.recovered.finished + s.recovered.reversed) console.log(`An earlier run was interrupted: ${s.recovered.finished} move(s) finished, ${s.recovered.reversed} left undone (their files are in place).`);
  for (const p of s.recovered.problems) console.error(`movesift apply: ${p}`);
  if (!s.planned.length) return console.log('No set-aside media left to move.'), ExitCode.done;
  printPlan(s, values.to);
  if (s.dryRun) return console.log('Dry run: nothing was moved.'), ExitCode.done;
  for (const k of s.skipped) console.error(`  left in place (${k.code}): ${k.message}`);
  console.log(`${values.copy ? 'Copied' : 'Moved'} ${s.moved} file(s) (apply ${s.applyId}). Manifest: ${s.manifest}`);
  console.log(`To put them back: movesift undo ${positionals[0]} --apply ${s.applyId}`);
  return ExitCode.done;
}

export async function undoCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ apply?: string; list?: boolean; events?: string }>(argv, { apply: { type: 'string' }, list: { type: 'boolean' }, events: { type: 'string' } }, 'undo');
  if (values.help) return console.log(UNDO_HELP), ExitCode.done;
  if (positionals.length !== 1) throw usageError('undo: give exactly one ledger. See `movesift undo --help`.');
  if (values.list) {
    const db = openLedger(positionals[0]);
    try {
      const rows = createMoveStore(db).applies();
      if (!rows.length) console.log('No apply has been run on this ledger.');
      for (const a of rows) console.log(`apply ${a.id}: ${a.started_at} by ${a.who ?? '?'}, ${a.mode} to ${a.target}, ${a.status}; ${a.moved} file(s), ${mb(a.bytes)} set aside now`);
      return ExitCode.done;
    } finally {
      db.close();
    }
  }
  const applyId = numberFlag('apply', values.apply, 1, 1e12, true);
  const events = values.events?.split(',').map((e) => e.trim()).filter(Boolean);
  if (events?.some((e) => !/^e[0-9a-f]{12}$/.test(e))) throw usageError(`undo --events: wanted event ids like e0123456789ab, comma-separated, got ${JSON.stringify(values.events)}`);
  const s = await undoApply({ ledger: positionals[0], applyId, events });
  for (const p of s.recovered.problems) console.error(`movesift undo: ${p}`);
  if (!s.restored && !s.problems.length) console.log('Nothing to put back: no file of this ledger is in a set-aside folder now.');
  else console.log(`Put back ${s.restored} file(s)${s.applies.length ? ` from apply ${s.applies.join(', ')}` : ''}.`);
  for (const p of s.problems) console.error(`  not put back (${p.code}): ${p.message}`);
  return s.problems.length ? ExitCode.failure : ExitCode.done;
}
