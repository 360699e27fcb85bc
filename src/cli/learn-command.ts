/** `movesift learn <ledger> [--deployment <id>]... [--use | --forget]`. */
import os from 'node:os';
import { parse } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { openLedger } from '../ledger/open-ledger.js';
import { createLearnedStore } from '../ledger/learned-store.js';
import { deploymentPass } from '../pipeline/deployment-pass.js';
import { learnDeployments, LearnErrorCode, MIN_PER_DECISION } from '../pipeline/learn.js';
import { MovesiftError } from '../shared/errors.js';

export const LEARN_HELP = `Usage: movesift learn <ledger> [--deployment <id>]... [--use | --forget]

Learns each deployment from the events people decided there (kept = something there, set aside
= blank): a small model on the motion evidence, the best track's features and, if the scan had
the classifier, its opinion. Before it is used it is judged on decisions it did not learn from
(5 folds): the share of kept events it keeps and of set-aside events it calls blank, which are
printed. It needs at least ${MIN_PER_DECISION} kept and ${MIN_PER_DECISION} set-aside events of a deployment and says how many
more when there are fewer.

Options:
  --deployment <id>  only this deployment (repeatable)                   default: every one
  --use              keep the model in the ledger (its ONNX file, hash and the decisions it
                     learned from) and let it decide the undecided events of its deployment:
                     likely-blank below its cut, never likely-blank at or above it. Nothing
                     is moved; decided events keep their decisions.
  --forget           stop using the deployment's model (it stays in the ledger for the record)
  --deployment-cut   re-judge with each deployment's own cut, as scan --deployment-cut
  --who <name>       recorded with the model                                default: the user name`;

const pct = (v: number) => `${(100 * v).toFixed(1)}%`;

export async function learnCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ deployment?: string[]; use?: boolean; forget?: boolean; 'deployment-cut'?: boolean; who?: string }>(
    argv,
    { deployment: { type: 'string', multiple: true }, use: { type: 'boolean' }, forget: { type: 'boolean' }, 'deployment-cut': { type: 'boolean' }, who: { type: 'string' } },
    'learn',
  );
  if (values.help) return console.log(LEARN_HELP), ExitCode.done;
  if (positionals.length !== 1) throw usageError('learn: give exactly one ledger. See `movesift learn --help`.');
  if (values.use && values.forget) throw usageError('learn: --use and --forget cannot go together');
  const db = openLedger(positionals[0]);
  try {
    const store = createLearnedStore(db);
    const known = new Set(store.deployments());
    for (const d of values.deployment ?? []) if (!known.has(d)) throw usageError(`learn: no deployment ${JSON.stringify(d)} in this ledger (it has ${[...known].join(', ') || 'none'})`);
    if (values.forget) {
      const deps = values.deployment ?? [...known];
      const forgotten = deps.filter((d) => store.forget(d));
      const changed = deploymentPass(db, forgotten, { raise: !!values['deployment-cut'] }).changed;
      console.log(forgotten.length ? `Stopped using the learned model of ${forgotten.join(', ')}; ${changed} undecided event(s) re-judged without it.` : 'No learned model was in use there.');
      return ExitCode.done;
    }
    const results = learnDeployments(db, { deployments: values.deployment, use: !!values.use, who: values.who ?? os.userInfo().username, raise: !!values['deployment-cut'] });
    for (const r of results) {
      if (!r.ok) {
        console.log(`${r.deployment}: not learned: ${r.reason}.`);
        continue;
      }
      const f = r.model.folds;
      console.log(`${r.deployment}: learned from ${f.kept} kept and ${f.setAside} set-aside event(s). On decisions it had not seen (5 folds): kept ${f.keptKept} of ${f.kept} kept events (${pct(f.recall)}), called ${f.blankCalled} of ${f.setAside} set-aside events blank (${pct(f.blankShare)}). Blank below ${r.model.cut.toFixed(4)}; model ${r.sha256.slice(0, 12)}.`);
      if (r.used) console.log(`  In use: ${r.verdictsChanged} undecided event(s) re-judged. Nothing was moved.`);
    }
    if (!results.some((r) => r.ok)) {
      throw new MovesiftError(LearnErrorCode.tooFew, 'learn: no deployment has enough decisions to learn from (see above)');
    }
    if (!values.use) console.log('Nothing changed; add --use to let the learned model decide the undecided events.');
    return ExitCode.done;
  } finally {
    db.close();
  }
}
