/** `movesift scan <folder>... --ledger <file>`. */
import { parse, numberFlag } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { progressPrinter } from './progress-bar.js';
import { cacheDirOf, DEFAULTS, scan, type ScanSummary } from '../pipeline/scan.js';
import { parsePlan, shardIndex, type ShardPlan, type ShardScanOptions } from '../pipeline/shard-plan.js';
import { fsReason } from '../shared/fs-words.js';
import { existsSync, promises as fs, readFileSync } from 'node:fs';
import path from 'node:path';
import { ledgerHealth, type ReportDeployment } from '../pipeline/report.js';
import { DEFAULT_EVENT_GAP_S } from '../pipeline/group-events.js';
import os from 'node:os';
import type { SkipReasonName } from '../media/find-media.js';

/** One core is left to decoding (libvips and ffmpeg run their own threads) and the desktop. */
const DEFAULT_WORKERS = Math.max(1, Math.min(8, os.availableParallelism() - 1));

export const SCAN_HELP = `Usage: movesift scan <folder>... --ledger <file> [options]
       movesift scan --plan <plan.json> [--shard <k>] --ledger <shard.ledger>

Screens every image and video under the folders and records the result in the ledger.
Rerunning the same command resumes: unchanged media already screened are skipped.

Options:
  --ledger <file>         the ledger to write (created if missing)                 required
  --analysis-width <px>   width frames are analysed at                             default ${DEFAULTS.analysisWidth}
  --video-fps <n>         frames per second analysed in videos                      default ${DEFAULTS.videoFps}
  --event-gap <s>         seconds between images that start a new event             default ${DEFAULT_EVENT_GAP_S}
  --flow                  add dense optical flow features (slower)
  --classifier <json>     a change classifier's manifest (models/change-classifier.json is
                          the shipped one): its opinion on each event's strongest changes
                          joins the motion score by the rule in the manifest; the report and
                          review say where it changed a verdict. Trained on generated scenes.
  --deployment-cut        let each deployment raise its likely-blank cut to the bulk of its own
                          scores (at most to 0.5). More false triggers called likely-blank, and
                          some low-scoring animals with them: measured on held-out scenes, about
                          one animal in 30 for 2-10 points more false triggers (docs/held-out-
                          validation.md). Off by default; every such call is marked.
  --workers <n>           analysis threads                                          default ${DEFAULT_WORKERS} (cores - 1)
  --deployments <csv>     folder to deployment table (folder, deploymentID, locationName,
                          latitude, longitude, cameraID, cameraModel)
  --json-progress         print progress as one JSON object per line on stdout
  -h, --help              this text

A shard of a cluster scan (see \`movesift shard plan\`): no folders, the plan's options:
  --plan <plan.json>      the plan; the folders and screening options come from it
  --shard <k>             which shard; default SLURM_ARRAY_TASK_ID or JOB_COMPLETION_INDEX
  --scratch <folder>      local folder the shard's ledger is written in, then copied to
                          --ledger when done                                       default: the temp folder

Exit status: 0 done (files that failed are recorded as errors), 1 failed or stopped, 2 bad usage.`;

/** The words for each reason an entry was passed over (find-media.ts SkipReason). */
const PASSED_OVER: Record<SkipReasonName, string> = {
  'not-media': 'not a photo or clip by its name',
  'hidden-or-system': 'hidden or system',
  'not-a-regular-file': 'not a regular file (a pipe, socket or device)',
  'broken-link': 'broken or looping link',
  'unreadable-folder': 'folder that could not be listed',
  'folder-already-scanned': 'link to a folder already scanned',
  'ledger-files': "the ledger's own files",
};

export function formatSummary(s: ScanSummary, health: readonly ReportDeployment[] = []): string {
  const v = s.verdicts;
  const passed = Object.entries(s.passedOver).map(([reason, n]) => `${n} ${PASSED_OVER[reason as SkipReasonName]}`);
  const problems = health.flatMap((d) => d.health.map((f) => `  ${d.id}: ${f.message}`));
  return [
    `${s.stopped ? 'Stopped' : 'Scanned'} ${s.files} file(s) into ${s.events} event(s) in ${s.seconds.toFixed(1)} s (${s.analysed} screened now, ${s.skipped} unchanged and skipped).`,
    `Verdicts: ${v['likely-blank'] ?? 0} likely-blank, ${v.unsure ?? 0} unsure, ${v.motion ?? 0} motion.`,
    ...(s.tookOverLock ? [`(The ledger's lock was left by ${s.tookOverLock.command}, process ${s.tookOverLock.pid}, since ${s.tookOverLock.since}, which is no longer running; this scan took it over.)`] : []),
    s.errors ? `${s.errors} file(s) could not be screened; they are listed with a reason in the report's "errors" and are never set aside.` : 'Every file could be read.',
    ...(passed.length ? [`Passed over (not photos or clips; listed in the report's "skipped"): ${passed.join(', ')}.`] : []),
    'Nothing was moved or deleted: likely-blank is a proposal for a person to confirm.',
    ...(problems.length ? [`Camera problems (check these triggers before trusting their verdicts):`, ...problems] : health.length ? [`No camera problems found in ${health.length} deployment(s) (clock, lens, night lamp).`] : []),
    ...(s.stopped ? ['Run the same command again to continue where it stopped.'] : []),
  ].join('\n');
}

/** The screening options, as scan, shard plan and slurm submit take them (scanOptionsOf reads them). */
export const SCREENING_FLAGS = {
  'analysis-width': { type: 'string' },
  'video-fps': { type: 'string' },
  'event-gap': { type: 'string' },
  flow: { type: 'boolean' },
  classifier: { type: 'string' },
  'deployment-cut': { type: 'boolean' },
  deployments: { type: 'string' },
} as const;
export type ScreeningFlags = { 'analysis-width'?: string; 'video-fps'?: string; 'event-gap'?: string; flow?: boolean; classifier?: string; 'deployment-cut'?: boolean; deployments?: string };

const SCAN_FLAGS = {
  ...SCREENING_FLAGS,
  ledger: { type: 'string' },
  workers: { type: 'string' },
  'json-progress': { type: 'boolean' },
  plan: { type: 'string' },
  shard: { type: 'string' },
  scratch: { type: 'string' },
} as const;
type ScanFlags = ScreeningFlags & { ledger?: string; workers?: string; 'json-progress'?: boolean; plan?: string; shard?: string; scratch?: string };

/** The screening options as flags give them (a plan's own are used instead under --plan). */
export function scanOptionsOf(values: ScreeningFlags): ShardScanOptions {
  return {
    analysisWidth: numberFlag('analysis-width', values['analysis-width'], 64, 4096, true),
    videoFps: numberFlag('video-fps', values['video-fps'], 0.1, 60),
    eventGapS: numberFlag('event-gap', values['event-gap'], 0, 86400),
    flow: !!values.flow,
    ...(values.classifier ? { classifier: path.resolve(values.classifier) } : {}),
    deploymentCut: !!values['deployment-cut'],
    deploymentsTable: values.deployments,
  };
}

export async function scanCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<ScanFlags>(argv, SCAN_FLAGS, 'scan');
  if (values.help) {
    console.log(SCAN_HELP);
    return ExitCode.done;
  }
  let roots = positionals;
  let options = scanOptionsOf(values);
  let shard: { plan: ShardPlan; index: number; scratch: string } | undefined;
  if (values.plan) {
    if (positionals.length) throw usageError('scan: with --plan the folders come from the plan; give no folders. See `movesift scan --help`.');
    for (const f of ['analysis-width', 'video-fps', 'event-gap', 'flow', 'classifier', 'deployment-cut', 'deployments'] as const) if (values[f] !== undefined) throw usageError(`scan: the plan fixes the screening options, so every shard screens alike; --${f} cannot be given with --plan`);
    const plan = parsePlan(readTextOrUsage(values.plan), values.plan);
    const index = shardIndex(plan, numberFlag('shard', values.shard, 0, 1e9, true));
    roots = plan.roots;
    options = plan.options;
    shard = { plan, index, scratch: path.resolve(values.scratch ?? os.tmpdir()) };
  } else {
    if (values.shard !== undefined || values.scratch !== undefined) throw usageError('scan: --shard and --scratch go with --plan. See `movesift scan --help`.');
    if (!roots.length) throw usageError('scan: give at least one folder to scan. See `movesift scan --help`.');
  }
  if (!values.ledger) throw usageError('scan: --ledger <file> is required (where the results are kept). See `movesift scan --help`.');
  const controller = new AbortController();
  const onSignal = (): void => {
    if (controller.signal.aborted) process.exit(ExitCode.failure);
    process.stderr.write('\nStopping after the event in progress (press Ctrl-C again to quit at once; the ledger stays consistent either way)...\n');
    controller.abort();
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  const json = !!values['json-progress'];
  const final = path.resolve(values.ledger);
  // A shard's ledger is written on local scratch and copied into place at the end: SQLite's
  // locking cannot be trusted on the network file systems clusters share.
  const working = shard ? await shardScratch(final, shard.plan, shard.index, shard.scratch) : final;
  try {
    const summary = await scan({
      roots,
      ledger: working,
      ...options,
      only: shard ? { deployments: new Set(shard.plan.shards[shard.index].deployments.map((d) => `${d.root}\0${d.id}`)), unassigned: shard.index === 0 } : undefined,
      shardOf: shard ? { plan: shard.plan.id, index: shard.index, shards: shard.plan.shards.length } : undefined,
      workers: numberFlag('workers', values.workers, 1, 64, true) ?? DEFAULT_WORKERS,
      signal: controller.signal,
      onProgress: progressPrinter(json ? 'json' : process.stderr.isTTY ? 'bar' : 'quiet'),
    });
    if (shard) await publishShard(working, final);
    if (!json) console.log(formatSummary(summary, ledgerHealth(final)));
    if (shard && !json) console.log(`Shard ${shard.index} of plan ${shard.plan.id} (${shard.plan.shards[shard.index].deployments.length} deployment(s)) is in ${final}; \`movesift merge\` joins the shards.`);
    return summary.stopped ? ExitCode.failure : ExitCode.done;
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
  }
}

function readTextOrUsage(file: string): string {
  try {
    return readFileSync(file, 'utf8');
  } catch (e) {
    throw usageError(`${file}: cannot read the plan (${fsReason(e)})`);
  }
}

/** The scratch copy a shard scans into: resumed from the ledger in place when a run before was
 *  stopped after publishing, or from an earlier scratch copy on the same node. */
async function shardScratch(final: string, plan: ShardPlan, index: number, dir: string): Promise<string> {
  await fs.mkdir(dir, { recursive: true });
  const working = path.join(dir, `movesift-${plan.id}-shard-${index}.ledger`);
  if (!existsSync(working) && existsSync(final)) {
    await fs.copyFile(final, working);
    if (existsSync(cacheDirOf(final))) await fs.cp(cacheDirOf(final), cacheDirOf(working), { recursive: true });
  }
  return working;
}

/** Copies the finished scratch ledger and its previews into place: to part names, then renamed,
 *  so the place holds the old shard or the new, never half of one. */
async function publishShard(working: string, final: string): Promise<void> {
  await fs.mkdir(path.dirname(final), { recursive: true });
  const previews = cacheDirOf(final);
  await fs.rm(`${previews}.part`, { recursive: true, force: true });
  if (existsSync(cacheDirOf(working))) await fs.cp(cacheDirOf(working), `${previews}.part`, { recursive: true });
  await fs.copyFile(working, `${final}.part`);
  await fs.rm(previews, { recursive: true, force: true });
  if (existsSync(`${previews}.part`)) await fs.rename(`${previews}.part`, previews);
  await fs.rename(`${final}.part`, final);
  await fs.rm(working, { force: true });
  await fs.rm(cacheDirOf(working), { recursive: true, force: true });
}
