/** `movesift decide <ledger> --keep|--set-aside [--verdict V] [--score-below X] [--deployment ID] [--event ID...]`. */
import os from 'node:os';
import { parse, numberFlag } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { openLedger } from '../ledger/open-ledger.js';
import { createMoveStore } from '../ledger/move-store.js';
import { createReviewQueries } from '../ledger/review-queries.js';

export const DECIDE_HELP = `Usage: movesift decide <ledger> --keep|--set-aside [filters]

Records a decision for every event matching all the filters, in the ledger's decisions log
(source "command"). Nothing is moved: \`movesift apply\` does that, and only when asked.
At least one filter is required, so that no command decides on everything by accident.

Filters (combine):
  --verdict likely-blank|unsure|motion
  --score-below <x>       motion evidence below x (0-1)
  --deployment <id>
  --event <id>            repeat for several events
Options:
  --who <name>            recorded with each decision              default: the user name
  -h, --help              this text`;

export async function decideCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ keep?: boolean; 'set-aside'?: boolean; verdict?: string; 'score-below'?: string; deployment?: string; event?: string[]; who?: string }>(argv, {
    keep: { type: 'boolean' },
    'set-aside': { type: 'boolean' },
    verdict: { type: 'string' },
    'score-below': { type: 'string' },
    deployment: { type: 'string' },
    event: { type: 'string', multiple: true },
    who: { type: 'string' },
  }, 'decide');
  if (values.help) {
    console.log(DECIDE_HELP);
    return ExitCode.done;
  }
  if (positionals.length !== 1) throw usageError('decide: give exactly one ledger. See `movesift decide --help`.');
  if (!!values.keep === !!values['set-aside']) throw usageError('decide: give exactly one of --keep or --set-aside.');
  if (values.verdict && !['likely-blank', 'unsure', 'motion'].includes(values.verdict)) throw usageError(`--verdict: wanted likely-blank, unsure or motion, got ${JSON.stringify(values.verdict)}`);
  const scoreBelow = numberFlag('score-below', values['score-below'], 0, 1);
  if (!values.verdict && scoreBelow === undefined && !values.deployment && !values.event?.length) throw usageError('decide: give at least one filter (--verdict, --score-below, --deployment or --event).');
  const decision = values.keep ? 'keep' : 'set-aside';
  const db = openLedger(positionals[0]);
  try {
    const q = createReviewQueries(db);
    if (values.deployment) {
      const known = q.summary().map((r) => r.deployment);
      if (!known.includes(values.deployment)) throw usageError(`--deployment: no deployment ${JSON.stringify(values.deployment)} in this ledger; it has ${[...new Set(known)].map((d) => JSON.stringify(d)).join(', ') || 'none'}.`);
    }
    const ids = q.matchingIds({ verdict: values.verdict, scoreBelow, deployment: values.deployment, ids: values.event });
    const unknown = (values.event ?? []).filter((id) => !ids.includes(id));
    if (unknown.length) console.error(`movesift decide: no analysed event ${unknown.join(', ')}; left out.`);
    if (!ids.length) {
      console.log('No event matches; nothing recorded.');
      return ExitCode.done;
    }
    const r = q.decide(ids, decision, 'command', values.who ?? os.userInfo().username);
    console.log(`${decision === 'keep' ? 'Kept' : 'Set aside'} ${r.written} event(s); ${r.changed} changed decision.${decision === 'set-aside' ? ' Nothing was moved: `movesift apply` moves set-aside media, and only when run.' : ''}`);
    if (decision === 'keep') {
      // Kept now, but an earlier apply moved their files: say so, and how to bring them back
      // (deciding never moves a file).
      const moved = createMoveStore(db).movedOfEvents(ids);
      const events = [...new Set(moved.map((m) => m.event_id))];
      if (moved.length) {
        console.log(`${events.length} of the kept event(s) have ${moved.length} file(s) in the set-aside folder still (moved by apply ${[...new Set(moved.map((m) => m.apply_id))].join(', ')}). To put them back:`);
        console.log(`  movesift undo ${positionals[0]} --events ${events.join(',')}`);
      }
    }
    return ExitCode.done;
  } finally {
    db.close();
  }
}
