/** `movesift report <ledger> [--format json|csv] [--out <file>]`. */
import { openLedger } from '../ledger/open-ledger.js';
import { writeOutput } from '../pipeline/output-guard.js';
import { parse } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { buildReport, reportCsv } from '../pipeline/report.js';

export const REPORT_HELP = `Usage: movesift report <ledger> [--format json|csv] [--out <file>]

Prints the screening result: every event with its files, times, verdict, score, activity
windows and latest decision, and every file that could not be screened (JSON schema
movesift.report/1; CSV has one row per event).

Options:
  --format json|csv   default json
  --out <file>        write to a file instead of stdout (a new file; see --force)
  --force             replace an existing file (never a ledger or a screened medium)
  -h, --help          this text`;

export async function reportCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ format?: string; out?: string; force?: boolean }>(argv, { format: { type: 'string' }, out: { type: 'string' }, force: { type: 'boolean' } }, 'report');
  if (values.help) {
    console.log(REPORT_HELP);
    return ExitCode.done;
  }
  if (positionals.length !== 1) throw usageError('report: give exactly one ledger. See `movesift report --help`.');
  const format = values.format ?? 'json';
  if (format !== 'json' && format !== 'csv') throw usageError(`--format: wanted json or csv, got ${JSON.stringify(format)}`);
  const r = buildReport(positionals[0]);
  const text = format === 'json' ? JSON.stringify(r, null, 1) + '\n' : reportCsv(r);
  if (values.out) {
    const db = openLedger(positionals[0], { readonly: true });
    try {
      writeOutput(values.out, text, { ledger: positionals[0], db, force: !!values.force });
    } finally {
      db.close();
    }
  } else process.stdout.write(text);
  return ExitCode.done;
}
