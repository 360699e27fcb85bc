/** `movesift scan <folder>... --ledger <file>`. */
import { parse, numberFlag } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { progressPrinter } from './progress-bar.js';
import { DEFAULTS, scan, type ScanSummary } from '../pipeline/scan.js';
import { ledgerHealth, type ReportDeployment } from '../pipeline/report.js';
import { DEFAULT_EVENT_GAP_S } from '../pipeline/group-events.js';
import os from 'node:os';
import type { SkipReasonName } from '../media/find-media.js';

/** One core is left to decoding (libvips and ffmpeg run their own threads) and the desktop. */
const DEFAULT_WORKERS = Math.max(1, Math.min(8, os.availableParallelism() - 1));

export const SCAN_HELP = `Usage: movesift scan <folder>... --ledger <file> [options]

Screens every image and video under the folders and records the result in the ledger.
Rerunning the same command resumes: unchanged media already screened are skipped.

Options:
  --ledger <file>         the ledger to write (created if missing)                 required
  --analysis-width <px>   width frames are analysed at                             default ${DEFAULTS.analysisWidth}
  --video-fps <n>         frames per second analysed in videos                      default ${DEFAULTS.videoFps}
  --event-gap <s>         seconds between images that start a new event             default ${DEFAULT_EVENT_GAP_S}
  --flow                  add dense optical flow features (slower)
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

export async function scanCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ ledger?: string; 'analysis-width'?: string; 'video-fps'?: string; 'event-gap'?: string; flow?: boolean; 'deployment-cut'?: boolean; workers?: string; deployments?: string; 'json-progress'?: boolean }>(argv, {
    ledger: { type: 'string' },
    'analysis-width': { type: 'string' },
    'video-fps': { type: 'string' },
    'event-gap': { type: 'string' },
    flow: { type: 'boolean' },
    'deployment-cut': { type: 'boolean' },
    workers: { type: 'string' },
    deployments: { type: 'string' },
    'json-progress': { type: 'boolean' },
  }, 'scan');
  if (values.help) {
    console.log(SCAN_HELP);
    return ExitCode.done;
  }
  if (!positionals.length) throw usageError('scan: give at least one folder to scan. See `movesift scan --help`.');
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
  try {
    const summary = await scan({
      roots: positionals,
      ledger: values.ledger,
      analysisWidth: numberFlag('analysis-width', values['analysis-width'], 64, 4096, true),
      videoFps: numberFlag('video-fps', values['video-fps'], 0.1, 60),
      eventGapS: numberFlag('event-gap', values['event-gap'], 0, 86400),
      flow: !!values.flow,
      deploymentCut: !!values['deployment-cut'],
      workers: numberFlag('workers', values.workers, 1, 64, true) ?? DEFAULT_WORKERS,
      deploymentsTable: values.deployments,
      signal: controller.signal,
      onProgress: progressPrinter(json ? 'json' : process.stderr.isTTY ? 'bar' : 'quiet'),
    });
    if (!json) console.log(formatSummary(summary, ledgerHealth(values.ledger)));
    return summary.stopped ? ExitCode.failure : ExitCode.done;
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
  }
}
