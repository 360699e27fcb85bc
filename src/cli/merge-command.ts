/** `movesift merge <shard.ledger>... --ledger <merged.ledger>`. */
import { parse } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { mergeShards } from '../pipeline/merge-shards.js';

export const MERGE_HELP = `Usage: movesift merge <shard.ledger>... --ledger <merged.ledger>

Joins the shard ledgers of a cluster scan (\`movesift shard plan\`, then \`movesift scan --plan\`
per shard) into one ledger, as if one machine had scanned everything: review, audit and export
use it as any other. Merging a shard again changes nothing; a shard scanned again replaces what
it brought before; decisions, applies (with their journal, so undo works) and audits made on a
shard are kept, marked with the shard they came from. The merged ledger may already hold
reviews. Shards of another plan or engine version, and a shard with a label calibration in
force, are refused. Shards the plan has and the ledger lacks are named.

Options:
  --ledger <file>    the merged ledger (created if missing)                       required
  -h, --help         this text

Exit status: 0 merged (a missing shard is named, not an error), 2 refused or bad usage.`;

export async function mergeCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ ledger?: string }>(argv, { ledger: { type: 'string' } }, 'merge');
  if (values.help) {
    console.log(MERGE_HELP);
    return ExitCode.done;
  }
  if (!values.ledger) throw usageError('merge: --ledger <merged.ledger> is required. See `movesift merge --help`.');
  if (!positionals.length) throw usageError('merge: give the shard ledgers to merge. See `movesift merge --help`.');
  const s = await mergeShards(positionals, values.ledger);
  const list = (xs: number[]): string => xs.join(', ');
  console.log(`Plan ${s.plan}: ${s.merged.length} shard(s) merged${s.merged.length ? ` (${list(s.merged)})` : ''}, ${s.replaced.length} replaced by a newer scan${s.replaced.length ? ` (${list(s.replaced)})` : ''}, ${s.unchanged.length} already merged and unchanged${s.unchanged.length ? ` (${list(s.unchanged)})` : ''}; ${s.events} event(s) and ${s.decisions} decision(s) taken in.`);
  console.log(s.missing.length ? `Still missing: shard(s) ${list(s.missing)} of ${s.shards}; merge them when they are done.` : `All ${s.shards} shard(s) of the plan are in ${values.ledger}.`);
  return ExitCode.done;
}
