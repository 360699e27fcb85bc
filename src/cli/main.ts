/**
 * The `movesift` command line. Each command is its own file; this one only dispatches and
 * turns errors into exit codes: usage and set-up problems exit 2 with the sentence that says
 * what to do, other failures exit 1.
 */
import { ExitCode, USAGE_CODES } from './cli-errors.js';
import { scanCommand } from './scan-command.js';
import { reportCommand } from './report-command.js';
import { decideCommand } from './decide-command.js';
import { reviewCommand } from './review-command.js';
import { applyCommand, undoCommand } from './apply-command.js';
import { auditCommand } from './audit-command.js';
import { exportCommand } from './export-command.js';
import { calibrateCommand } from './calibrate-command.js';
import { learnCommand } from './learn-command.js';
import { cutCommand } from './cut-command.js';
import { shardCommand } from './shard-command.js';
import { mergeCommand } from './merge-command.js';
import { slurmCommand } from './slurm-command.js';
import { ENGINE_VERSION } from '../pipeline/engine-version.js';
import pkg from '../../package.json' with { type: 'json' };

const HELP = `Usage: movesift <command> [options]

Screens camera-trap bursts and survey video by motion and keeps the result in a ledger.

Commands:
  scan <folder>... --ledger <file>     screen media into a ledger (resumable)
  report <ledger> [--format json|csv]  print the screening result
  review [<ledger>]                    the review app in your browser (keyboard-driven)
  decide <ledger> --keep|--set-aside   record decisions for events matching filters
  apply <ledger> --to <folder>         move set-aside media into a set-aside folder (verified, undoable)
  undo <ledger> [--apply <id>]         put moved media back
  audit <ledger> --sample <n>          check set-aside events by a random sample: miss-rate interval
  export <ledger> --format csv|camtrap-dp --out <path>   the result as CSV or a Camtrap DP package
  calibrate <ledger> --recall 0.99     the likely-blank threshold from people's labels
  learn <ledger> [--use]               a model per deployment learned from people's decisions
  cut <ledger> --out <folder>          each clip's activity windows as separate files, with a MaxN sheet
  shard plan <folder>... --shards <n>  split a scan into whole-deployment shards for a cluster
  merge <shard.ledger>... --ledger <f> join the shards' ledgers into one
  slurm submit <folder>... --ledger <f> --shards <n>   the scan as a Slurm job array, then the merge

Run \`movesift <command> --help\` for a command's options; \`movesift --version\` for the version.`;

const COMMANDS: Record<string, (argv: string[]) => Promise<number>> = { scan: scanCommand, report: reportCommand, review: reviewCommand, decide: decideCommand, apply: applyCommand, undo: undoCommand, audit: auditCommand, export: exportCommand, calibrate: calibrateCommand, learn: learnCommand, cut: cutCommand, shard: shardCommand, merge: mergeCommand, slurm: slurmCommand };

export async function main(argv: string[]): Promise<number> {
  const [cmd, ...rest] = argv;
  if (!cmd || cmd === '--help' || cmd === '-h' || cmd === 'help') {
    console.log(HELP);
    return cmd ? ExitCode.done : ExitCode.usage;
  }
  if (cmd === '--version' || cmd === '-V') {
    console.log(`movesift ${pkg.version} (engine ${ENGINE_VERSION})`);
    return ExitCode.done;
  }
  const run = COMMANDS[cmd];
  if (!run) {
    console.error(`movesift: unknown command ${JSON.stringify(cmd)}. Commands: ${Object.keys(COMMANDS).join(', ')}.`);
    return ExitCode.usage;
  }
  try {
    return await run(rest);
  } catch (e) {
    const code = (e as { code?: string }).code;
    // Messages may name their command themselves ("scan: give at least one folder"); the prefix
    // below already does.
    const message = (e as Error).message.replace(new RegExp(`^${cmd}(: | (?=-))`), '');
    if (code && USAGE_CODES.has(code)) {
      console.error(`movesift ${cmd}: ${message}`);
      return ExitCode.usage;
    }
    console.error(`movesift ${cmd} failed${code ? ` (${code})` : ''}: ${message}`);
    return ExitCode.failure;
  }
}

main(process.argv.slice(2)).then((c) => process.exit(c));
