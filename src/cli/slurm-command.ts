/**
 * `movesift slurm submit <folder>... --ledger <merged> --shards N`: a cluster scan on the
 * cluster's own scheduler. Writes the plan and two sbatch scripts (the scan as a job array, one
 * task per shard; the merge, which waits for the whole array with afterok), submits them with
 * `sbatch`, prints the job ids and where the logs go; `--wait` follows them to the end and exits
 * 0 only when the merged ledger holds every shard; `--dry-run` prints the scripts and submits
 * nothing. A shard that failed is named with its log and the command that resubmits it alone.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import Database from 'better-sqlite3';
import { parse, numberFlag } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { SCREENING_FLAGS, scanOptionsOf, type ScreeningFlags } from './scan-command.js';
import { planShards, type ShardPlan } from '../pipeline/shard-plan.js';
import { MovesiftError } from '../shared/errors.js';

export const SLURM_HELP = `Usage: movesift slurm submit <folder>... --ledger <merged.ledger> --shards <n> [options]

Scans the folders on a Slurm cluster: a plan of whole-deployment shards, the scan as a job array
(one task per shard, its ledger written on the node's local disk, then copied into place) and
the merge of the shards into --ledger once every task has succeeded.

Options:
  --ledger <file>        the merged ledger                                        required
  --shards <n>           how many shards (array tasks)                            required
  --partition <p>        the partition to run in                                  default: the cluster's
  --sbatch-arg <arg>     an sbatch option for both jobs, e.g. --sbatch-arg=--time=04:00:00 (repeatable)
  --work <folder>        where the plan, scripts, shard ledgers and logs go (on storage the
                         nodes share)                                             default: <ledger>.cluster
  --wait                 follow the jobs to the end; exit 0 only when every shard is merged
  --dry-run              print the plan's summary and the scripts; submit nothing
  --analysis-width, --video-fps, --event-gap, --flow, --deployment-cut, --deployments
                         the screening options, as for \`movesift scan\`
  -h, --help             this text

Exit status: 0 submitted (with --wait: merged whole), 1 a job failed, 2 bad usage or no sbatch.`;

const BIN = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../bin/movesift.mjs');
const q = (s: string): string => `'${s.replaceAll("'", `'\\''`)}'`;

interface Scripts {
  array: string;
  merge: string;
}

function scripts(plan: ShardPlan, work: string, ledger: string, partition: string | undefined, extra: string[]): Scripts {
  const head = (name: string, log: string): string[] => [
    '#!/bin/bash',
    `#SBATCH --job-name=${name}`,
    `#SBATCH --output=${path.join(work, 'logs', `${log}.out`)}`,
    `#SBATCH --error=${path.join(work, 'logs', `${log}.err`)}`,
    ...(partition ? [`#SBATCH --partition=${partition}`] : []),
    ...extra.map((a) => `#SBATCH ${a}`),
  ];
  const run = `${q(process.execPath)} ${q(BIN)}`;
  return {
    array: [
      ...head('movesift-scan', 'shard-%a'),
      `#SBATCH --array=0-${plan.shards.length - 1}`,
      'set -euo pipefail',
      `# Shard $SLURM_ARRAY_TASK_ID of plan ${plan.id}; its ledger is written on the node's local disk first.`,
      `exec ${run} scan --plan ${q(path.join(work, 'plan.json'))} --ledger ${q(path.join(work, 'shards'))}/"$SLURM_ARRAY_TASK_ID".ledger --scratch "\${TMPDIR:-/tmp}"`,
      '',
    ].join('\n'),
    merge: [
      ...head('movesift-merge', 'merge'),
      'set -euo pipefail',
      `exec ${run} merge ${Array.from({ length: plan.shards.length }, (_, k) => q(path.join(work, 'shards', `${k}.ledger`))).join(' ')} --ledger ${q(ledger)}`,
      '',
    ].join('\n'),
  };
}

function sbatch(args: string[]): string {
  const r = spawnSync('sbatch', ['--parsable', ...args], { encoding: 'utf8' });
  if (r.error) throw new MovesiftError('E_SLURM_MISSING', `sbatch could not be run (${(r.error as NodeJS.ErrnoException).code}); run this on a machine that submits to Slurm`);
  if (r.status !== 0) throw new MovesiftError('E_SLURM_SUBMIT', `sbatch refused the job: ${r.stderr.trim()}`);
  return r.stdout.trim().split(';')[0];
}

/** The jobs still known to the scheduler (queued or running). */
function queued(ids: string[]): number {
  const r = spawnSync('squeue', ['-h', '-j', ids.join(','), '-o', '%i'], { encoding: 'utf8' });
  return r.status === 0 ? r.stdout.trim().split('\n').filter(Boolean).length : 0;
}

function mergedShards(ledger: string, planId: string): number {
  if (!existsSync(ledger)) return 0;
  try {
    const db = new Database(ledger, { readonly: true, fileMustExist: true });
    try {
      return (db.prepare('SELECT count(*) AS n FROM merges WHERE plan_id = ?').get(planId) as { n: number }).n;
    } finally {
      db.close();
    }
  } catch {
    return 0; // not yet written, or written by an older Movesift
  }
}

export async function slurmCommand(argv: string[]): Promise<number> {
  const [verb, ...rest] = argv;
  if (verb === '--help' || verb === '-h' || verb === undefined) {
    console.log(SLURM_HELP);
    return verb === undefined ? ExitCode.usage : ExitCode.done;
  }
  if (verb !== 'submit') throw usageError(`slurm: unknown step ${JSON.stringify(verb)}; the step is \`submit\`. See \`movesift slurm --help\`.`);
  const { values, positionals } = parse<ScreeningFlags & { ledger?: string; shards?: string; partition?: string; 'sbatch-arg'?: string[]; work?: string; wait?: boolean; 'dry-run'?: boolean }>(rest, {
    ...SCREENING_FLAGS,
    ledger: { type: 'string' },
    shards: { type: 'string' },
    partition: { type: 'string' },
    'sbatch-arg': { type: 'string', multiple: true },
    work: { type: 'string' },
    wait: { type: 'boolean' },
    'dry-run': { type: 'boolean' },
  }, 'slurm submit');
  if (values.help) {
    console.log(SLURM_HELP);
    return ExitCode.done;
  }
  if (!positionals.length) throw usageError('slurm submit: give the folders to scan. See `movesift slurm --help`.');
  if (!values.ledger) throw usageError('slurm submit: --ledger <merged.ledger> is required. See `movesift slurm --help`.');
  const shards = numberFlag('shards', values.shards, 1, 100_000, true);
  if (shards === undefined) throw usageError('slurm submit: --shards <n> is required. See `movesift slurm --help`.');
  const extra = values['sbatch-arg'] ?? [];
  for (const a of extra) if (!a.startsWith('-') || /[\n\r]/.test(a)) throw usageError(`--sbatch-arg: wanted an sbatch option such as --time=04:00:00, got ${JSON.stringify(a)}`);
  const ledger = path.resolve(values.ledger);
  const work = path.resolve(values.work ?? `${ledger}.cluster`);
  const plan = await planShards(positionals, shards, scanOptionsOf(values));
  const s = scripts(plan, work, ledger, values.partition, extra);
  if (values['dry-run']) {
    console.log(`Plan ${plan.id}: ${plan.shards.reduce((a, x) => a + x.deployments.length, 0)} deployment(s) in ${shards} shard(s); nothing submitted.\n`);
    console.log(`# ${path.join(work, 'array.sbatch')}\n${s.array}\n# ${path.join(work, 'merge.sbatch')}\n${s.merge}`);
    return ExitCode.done;
  }
  for (const d of ['shards', 'logs']) mkdirSync(path.join(work, d), { recursive: true });
  writeFileSync(path.join(work, 'plan.json'), JSON.stringify(plan, null, 2) + '\n');
  writeFileSync(path.join(work, 'array.sbatch'), s.array, { mode: 0o755 });
  writeFileSync(path.join(work, 'merge.sbatch'), s.merge, { mode: 0o755 });
  const arrayId = sbatch([path.join(work, 'array.sbatch')]);
  // A failed task makes afterok impossible: the merge is then cancelled, not left waiting for ever.
  const mergeId = sbatch([`--dependency=afterok:${arrayId}`, '--kill-on-invalid-dep=yes', path.join(work, 'merge.sbatch')]);
  console.log(`Submitted the scan as job array ${arrayId} (${shards} task(s)) and the merge as job ${mergeId}, which starts when every task has succeeded.`);
  console.log(`Logs: ${path.join(work, 'logs')} (shard-<k>.out/.err, merge.out/.err). Shard ledgers: ${path.join(work, 'shards')}.`);
  if (!values.wait) return ExitCode.done;
  let last = '';
  for (;;) {
    const done = existsSync(path.join(work, 'shards')) ? readdirSync(path.join(work, 'shards')).filter((f) => /^\d+\.ledger$/.test(f)).length : 0;
    const merged = mergedShards(ledger, plan.id);
    const line = `${done} of ${shards} shard(s) scanned, ${merged} merged`;
    if (line !== last) console.log(line);
    last = line;
    if (queued([arrayId, mergeId]) === 0) break;
    await new Promise((r) => setTimeout(r, 2000));
  }
  const merged = mergedShards(ledger, plan.id);
  if (merged === shards) {
    console.log(`Done: every shard is merged into ${ledger}.`);
    return ExitCode.done;
  }
  const failed = Array.from({ length: shards }, (_, k) => k).filter((k) => !existsSync(path.join(work, 'shards', `${k}.ledger`)));
  for (const k of failed) console.error(`Shard ${k} did not finish: see ${path.join(work, 'logs', `shard-${k}.err`)}. Resubmit it alone: sbatch --array=${k} ${path.join(work, 'array.sbatch')}`);
  console.error(`The merged ledger holds ${merged} of ${shards} shard(s). When the failed ones are done: sbatch ${path.join(work, 'merge.sbatch')}`);
  return ExitCode.failure;
}
