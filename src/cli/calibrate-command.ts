/** `movesift calibrate <ledger> --recall 0.99 [--apply]`. */
import os from 'node:os';
import { parse, numberFlag } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { calibrate } from '../pipeline/calibrate.js';

export const CALIBRATE_HELP = `Usage: movesift calibrate <ledger> --recall <share> [--apply]

Proposes the highest likely-blank threshold whose recall on the events people labelled as
holding an animal (kept, or found in an audit) is at least <share> with 95% confidence, and
says how many events it would call likely-blank. With --apply, the verdicts of undecided
events are set by it (decided events keep theirs; nothing is moved). Refuses when too few
animals are labelled to show the recall asked for.

Options:
  --recall <share>   the recall to guarantee, e.g. 0.99                     required
  --apply            re-verdict the undecided events with the proposed threshold
  --who <name>       recorded with the calibration                         default: the user name`;

export async function calibrateCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ recall?: string; apply?: boolean; who?: string }>(argv, { recall: { type: 'string' }, apply: { type: 'boolean' }, who: { type: 'string' } }, 'calibrate');
  if (values.help) return console.log(CALIBRATE_HELP), ExitCode.done;
  if (positionals.length !== 1) throw usageError('calibrate: give exactly one ledger. See `movesift calibrate --help`.');
  const recall = numberFlag('recall', values.recall, 0.5, 0.9999);
  if (recall === undefined) throw usageError('calibrate: --recall <share> is required, e.g. --recall 0.99');
  const c = calibrate(positionals[0], { recall, apply: !!values.apply, who: values.who ?? os.userInfo().username });
  console.log(`${c.animals} event(s) labelled as holding an animal, ${c.empties} as empty.`);
  console.log(`Proposed likely-blank threshold: ${c.threshold.toFixed(4)} (recall ${(100 * c.recall).toFixed(2)}% on the labelled animals, at least ${(100 * c.recallLower).toFixed(2)}% with 95% confidence).`);
  console.log(`It would call ${c.wouldBeBlank} event(s) likely-blank (now ${c.blankNow}); ${c.undecidedChanges} undecided event(s) would change verdict.`);
  console.log(c.applied ? `Applied: ${c.undecidedChanges} undecided event(s) re-verdicted. Nothing was moved.` : 'Nothing changed; add --apply to re-verdict the undecided events.');
  return ExitCode.done;
}
