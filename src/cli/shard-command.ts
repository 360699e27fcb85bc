/** `movesift shard plan <folder>... --shards N --out plan.json [screening options]`. */
import { parse, numberFlag } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { SCREENING_FLAGS, scanOptionsOf, type ScreeningFlags } from './scan-command.js';
import { planShards } from '../pipeline/shard-plan.js';
import { writePlainOutput } from '../pipeline/output-guard.js';

export const SHARD_HELP = `Usage: movesift shard plan <folder>... --shards <n> --out <plan.json> [options]

Splits a scan too large for one machine into shards, for a cluster's job array: whole
deployments only (a deployment's triggers are each other's background), balanced by the work
they hold (images, and clip seconds read with ffprobe). The plan fixes the screening options,
so every shard screens as one scan would. Then, per shard (on a Slurm array, K comes from
SLURM_ARRAY_TASK_ID):

  movesift scan --plan plan.json --shard K --ledger shards/K.ledger

Options:
  --shards <n>            how many shards                                          required
  --out <file>            where the plan goes (not over an existing file without --force)
  --force                 replace an earlier plan at --out
  --analysis-width, --video-fps, --event-gap, --flow, --deployment-cut, --deployments
                          the screening options, as for \`movesift scan\`
  -h, --help              this text`;

export async function shardCommand(argv: string[]): Promise<number> {
  const [verb, ...rest] = argv;
  if (verb === '--help' || verb === '-h' || verb === undefined) {
    console.log(SHARD_HELP);
    return verb === undefined ? ExitCode.usage : ExitCode.done;
  }
  if (verb !== 'plan') throw usageError(`shard: unknown step ${JSON.stringify(verb)}; the step is \`plan\`. See \`movesift shard --help\`.`);
  const { values, positionals } = parse<ScreeningFlags & { shards?: string; out?: string; force?: boolean }>(rest, {
    ...SCREENING_FLAGS,
    shards: { type: 'string' },
    out: { type: 'string' },
    force: { type: 'boolean' },
  }, 'shard plan');
  if (values.help) {
    console.log(SHARD_HELP);
    return ExitCode.done;
  }
  if (!positionals.length) throw usageError('shard plan: give the folders to scan. See `movesift shard --help`.');
  const shards = numberFlag('shards', values.shards, 1, 100_000, true);
  if (shards === undefined) throw usageError('shard plan: --shards <n> is required. See `movesift shard --help`.');
  if (!values.out) throw usageError('shard plan: --out <plan.json> is required. See `movesift shard --help`.');
  const plan = await planShards(positionals, shards, scanOptionsOf(values));
  writePlainOutput(values.out, JSON.stringify(plan, null, 2) + '\n', !!values.force);
  const deployments = plan.shards.reduce((a, s) => a + s.deployments.length, 0);
  console.log(`Plan ${plan.id}: ${deployments} deployment(s) in ${plan.shards.length} shard(s), work per shard ${plan.shards.map((s) => s.work).join(', ')} (images, and clip seconds).`);
  const empty = plan.shards.filter((s) => !s.deployments.length).length;
  if (empty) console.log(`${empty} shard(s) have no deployment (more shards than deployments); they finish at once.`);
  console.log(`Written to ${values.out}. Each shard: movesift scan --plan ${values.out} --shard K --ledger shards/K.ledger`);
  return ExitCode.done;
}
