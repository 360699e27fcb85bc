/** `movesift audit`: draw a random check of set-aside events, record answers, report the miss rate. */
import os from 'node:os';
import { parse, numberFlag } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { answerAudit, drawAudit, loadAuditReport, setAsideCount, zeroMissPlan, type AuditReport } from '../pipeline/audit.js';

export const AUDIT_HELP = `Usage: movesift audit <ledger> [options]

Checks the set-aside events by a random sample: a person looks at each sampled event and
answers only "animal present: yes or no" (in the app's audit view, or with --answer), and the
report says how many of all set-aside events may hold an animal, with an exact 95% interval.
An audit passes only when the upper bound is below the tolerance. It blocks nothing.

  movesift audit <ledger> --plan [--tolerance 0.01]        how many to check (never more than are
                                                            set aside; without a ledger, for a large set)
  movesift audit <ledger> --sample <n> [--strata 3]        draw a sample (simple random by default;
                                                            --strata splits by score band)
  movesift audit <ledger> --answer <event>=yes|no ...       record answers (repeatable)
  movesift audit <ledger> [--audit <id>] [--json]           the report (the latest audit by default)

Options:
  --tolerance <share>   the largest acceptable share of set-aside events with an animal   default 0.01
  --alpha <a>           1 - confidence                                                    default 0.05
  --seed <n>            seed of the draw (recorded; a new one is chosen when absent)
  --who <name>          recorded with the draw and the answers                            default: the user name`;

const pct = (v: number): string => `${(100 * v).toFixed(2)}%`;

export function formatAudit(r: AuditReport): string {
  const lines = [
    `Audit ${r.id} (${r.createdAt}, by ${r.who ?? '?'}, seed ${r.seed}): ${r.sampleSize} of ${r.population} set-aside events drawn, ${r.answered} answered.`,
    `Animals found: ${r.animals} of ${r.answered}.`,
    `Share of set-aside events with an animal: ${pct(r.share.estimate)}, ${Math.round((1 - r.alpha) * 100)}% interval ${pct(r.share.lower)} to ${pct(r.share.upper)} (${r.share.method === 'hypergeometric' ? 'exact hypergeometric, finite population' : 'exact Clopper-Pearson'}).`,
    `Missed animal events among the set-aside: about ${r.missedEvents.estimate.toFixed(1)}, between ${r.missedEvents.lower} and ${r.missedEvents.upper}.`,
  ];
  if (r.strata.length > 1) for (const s of r.strata) lines.push(`  score ${s.scoreFrom.toFixed(3)}-${s.scoreTo.toFixed(3)}: ${s.animals} animal(s) in ${s.answered} of ${s.sample} drawn from ${s.population}`);
  if (r.verdict === 'incomplete') lines.push(`Not finished: ${r.sampleSize - r.answered} sampled event(s) still unanswered.`);
  else if (r.verdict === 'pass') lines.push(`PASS: at ${Math.round((1 - r.alpha) * 100)}% confidence at most ${pct(r.shareUpperOneSided)} of the set-aside events hold an animal, below the tolerance of ${pct(r.tolerance)}.`);
  else lines.push(`FAIL: the set-aside events may hold animals in up to ${pct(r.shareUpperOneSided)} of cases, not below the tolerance of ${pct(r.tolerance)}. ${r.animals === 0 ? `With no animal found, ${r.zeroMissSampleSize} checks would be needed to show it.` : 'Look at the set-aside events again before applying.'}`);
  return lines.join('\n');
}

export async function auditCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ plan?: boolean; sample?: string; strata?: string; answer?: string[]; audit?: string; json?: boolean; tolerance?: string; alpha?: string; seed?: string; who?: string }>(argv, {
    plan: { type: 'boolean' }, sample: { type: 'string' }, strata: { type: 'string' }, answer: { type: 'string', multiple: true }, audit: { type: 'string' },
    json: { type: 'boolean' }, tolerance: { type: 'string' }, alpha: { type: 'string' }, seed: { type: 'string' }, who: { type: 'string' },
  }, 'audit');
  if (values.help) return console.log(AUDIT_HELP), ExitCode.done;
  const tolerance = numberFlag('tolerance', values.tolerance, 1e-6, 0.5) ?? 0.01;
  const alpha = numberFlag('alpha', values.alpha, 1e-6, 0.5) ?? 0.05;
  if (values.plan) {
    if (positionals.length > 1) throw usageError('audit --plan: give at most one ledger. See `movesift audit --help`.');
    const population = positionals.length ? setAsideCount(positionals[0]) : undefined;
    const n = zeroMissPlan(tolerance, alpha, population);
    const conf = `${Math.round((1 - alpha) * 100)}%`;
    if (population !== undefined && n >= population) console.log(`Check all ${population} set-aside events: so few that a sample cannot show fewer than ${pct(tolerance)} hold an animal; with every one checked and none an animal, none does.`);
    else if (population !== undefined && n > 0.05 * population) console.log(`Check ${n} of the ${population} set-aside events, drawn at random. If none holds an animal, at ${conf} confidence fewer than ${pct(tolerance)} of them do (exact bound for a population this small). Any animal found needs a larger sample to pass.`);
    else console.log(`Check ${n} randomly drawn set-aside events${population !== undefined ? ` of ${population}` : ''}. If none holds an animal, at ${conf} confidence fewer than ${pct(tolerance)} of all set-aside events do (n >= ln(${alpha}) / ln(1 - ${tolerance})). Any animal found needs a larger sample to pass.`);
    return ExitCode.done;
  }
  if (positionals.length !== 1) throw usageError('audit: give exactly one ledger. See `movesift audit --help`.');
  const ledger = positionals[0];
  const who = values.who ?? os.userInfo().username;
  const auditId = numberFlag('audit', values.audit, 1, 1e12, true);
  if (values.sample !== undefined) {
    const sample = numberFlag('sample', values.sample, 1, 1e7, true)!;
    const { id, audit } = drawAudit(ledger, { sample, seed: numberFlag('seed', values.seed, 1, 2 ** 31, true), tolerance, alpha, strata: numberFlag('strata', values.strata, 1, 20, true), who });
    const all = sample > audit.population ? ` (you asked for ${sample}; that is every one of them)` : '';
    console.log(`Audit ${id}: drew ${audit.sample_size} of ${audit.population} set-aside events${all} (seed ${audit.seed}). Answer them in the app (movesift review ${ledger}, key v) or with --answer <event>=yes|no.`);
    return ExitCode.done;
  }
  if (values.answer?.length) {
    const answers = values.answer.map((a) => {
      const m = /^(e[0-9a-f]{12})=(yes|no)$/.exec(a);
      if (!m) throw usageError(`--answer: wanted <event id>=yes|no, got ${JSON.stringify(a)}`);
      return { event: m[1], animal: m[2] === 'yes' };
    });
    const id = auditId ?? loadAuditReport(ledger).id;
    answerAudit(ledger, id, answers, who);
    if (!values.json) console.log(`Recorded ${answers.length} answer(s) in audit ${id}.`);
  }
  const report = loadAuditReport(ledger, auditId);
  console.log(values.json ? JSON.stringify(report, null, 1) : formatAudit(report));
  return ExitCode.done;
}
