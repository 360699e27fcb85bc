/**
 * Audits of the set-aside events: a simple random sample (optionally stratified by score band),
 * a person's yes/no per sampled event, and what that says about the animals among all the
 * set-aside events.
 *
 * Estimator: the sampled share of events holding an animal, k/n. Stratified draws use
 * proportional allocation (each score band sampled in proportion to its size), so the sample is
 * self-weighting: the stratified estimator sum_h (N_h/N)(k_h/n_h) equals k/n, and its variance
 * is at most that of a simple random sample, so the pooled exact interval below is conservative.
 * Interval: exact Clopper-Pearson (binomial) at confidence 1 - alpha; when the sample is over 5%
 * of the population, the exact hypergeometric bounds for a finite population instead.
 * Pass: only when every sampled event is answered and the one-sided upper bound (1 - alpha) is
 * below the tolerance: evidence that misses are rare, not merely absence of evidence.
 */
import { randomInt } from 'node:crypto';
import { openLedger } from '../ledger/open-ledger.js';
import { createAuditStore, type AuditItemRow, type AuditRow } from '../ledger/audit-store.js';
import { clopperPearson, clopperPearsonUpper, sampleSizeForZeroMisses } from '../shared/stats/binomial.js';
import { hypergeometricBounds } from '../shared/stats/hypergeometric.js';
import { mulberry32, sampleWithoutReplacement } from '../shared/stats/seeded-random.js';
import { MovesiftError } from '../shared/errors.js';
import type { AuditReport } from '../shared/review-api.js';

export const AuditErrorCode = { nothingSetAside: 'E_AUDIT_NOTHING_SET_ASIDE', unknownAudit: 'E_AUDIT_UNKNOWN', notInAudit: 'E_AUDIT_NOT_SAMPLED' } as const;

export interface DrawOptions {
  sample: number;
  seed?: number;
  tolerance?: number;
  alpha?: number;
  /** Score bands to stratify by (1 = a simple random sample). */
  strata?: number;
  who?: string | null;
}

export interface Stratum {
  band: number;
  scoreFrom: number;
  scoreTo: number;
  population: number;
  sample: number;
}

/** Proportional allocation by largest remainder: sizes sum to n, each at most its stratum. */
function allocate(sizes: number[], n: number): number[] {
  const N = sizes.reduce((a, b) => a + b, 0);
  const exact = sizes.map((s) => (s * n) / N);
  const out = exact.map(Math.floor);
  const order = exact.map((e, i) => [e - Math.floor(e), i] as const).sort((a, b) => b[0] - a[0]);
  for (let r = n - out.reduce((a, b) => a + b, 0), j = 0; r > 0; j++, r--) out[order[j % order.length][1]]++;
  return out.map((v, i) => Math.min(v, sizes[i]));
}

export function drawAudit(ledger: string, o: DrawOptions): { id: number; audit: AuditRow; items: AuditItemRow[] } {
  const db = openLedger(ledger);
  try {
    const store = createAuditStore(db);
    const pop = store.population().sort((a, b) => a.score - b.score || (a.event_id < b.event_id ? -1 : 1));
    if (!pop.length) throw new MovesiftError(AuditErrorCode.nothingSetAside, 'no event is set aside: there is nothing to audit yet');
    const seed = o.seed ?? randomInt(1, 2 ** 31);
    const next = mulberry32(seed);
    const k = Math.max(1, Math.min(o.strata ?? 1, pop.length));
    const bands: Array<typeof pop> = Array.from({ length: k }, (_, b) => pop.slice(Math.floor((b * pop.length) / k), Math.floor(((b + 1) * pop.length) / k)));
    const sizes = allocate(bands.map((b) => b.length), Math.min(o.sample, pop.length));
    const strata: Stratum[] = bands.map((b, i) => ({ band: i, scoreFrom: b[0]?.score ?? 0, scoreTo: b[b.length - 1]?.score ?? 0, population: b.length, sample: sizes[i] }));
    const drawn = bands.flatMap((b, i) => sampleWithoutReplacement(b, sizes[i], next).map((x) => ({ event_id: x.event_id, stratum: i })));
    // Shown in a shuffled order, so the person does not meet them sorted by score.
    const items = sampleWithoutReplacement(drawn, drawn.length, next);
    const row = { who: o.who ?? null, seed, population: pop.length, sample_size: items.length, tolerance: o.tolerance ?? 0.01, alpha: o.alpha ?? 0.05, strata: JSON.stringify(strata) };
    const id = store.createAudit(row, items);
    return { id, audit: store.audit(id)!, items: store.items(id) };
  } finally {
    db.close();
  }
}

export function answerAudit(ledger: string, auditId: number, answers: Array<{ event: string; animal: boolean }>, who: string | null): void {
  const db = openLedger(ledger);
  try {
    const store = createAuditStore(db);
    if (!store.audit(auditId)) throw new MovesiftError(AuditErrorCode.unknownAudit, `no audit ${auditId} in this ledger`);
    db.transaction(() => {
      for (const a of answers) {
        if (!store.isItem(auditId, a.event)) throw new MovesiftError(AuditErrorCode.notInAudit, `event ${a.event} was not drawn in audit ${auditId}`);
        store.answer(auditId, a.event, a.animal, who);
      }
    })();
  } finally {
    db.close();
  }
}

export type { AuditReport };

/** The report's bounds switch to the finite population's when the sample is over this share of it. */
const FINITE_SHARE = 0.05;

/** The one-sided upper bound (1 - alpha) on the share of the N set-aside events holding an
 *  animal, from k found in n answered: exact hypergeometric when n is over 5% of N, else
 *  Clopper-Pearson; 1 with nothing answered. */
export function shareUpperBound(k: number, n: number, N: number, alpha: number): number {
  if (n === 0) return 1;
  return n > FINITE_SHARE * N ? hypergeometricBounds(k, N, n, alpha).upper / N : clopperPearsonUpper(k, n, alpha);
}

/**
 * Fewest checks that can pass with no animal found: the smallest n whose upper bound, computed
 * as the report computes it, is under the tolerance. Without a population (or a large one) that
 * is ln(alpha) / ln(1 - tolerance); a population too small for that is checked whole or nearly
 * (with every event checked and none an animal, the bound is 0), and the plan never asks for
 * more events than exist.
 */
export function zeroMissPlan(tolerance: number, alpha: number, population?: number): number {
  const n0 = sampleSizeForZeroMisses(tolerance, alpha);
  if (population === undefined || n0 <= FINITE_SHARE * population) return n0;
  for (let n = 1; n < population; n++) if (shareUpperBound(0, n, population, alpha) < tolerance) return n;
  return population;
}

export function reportAudit(audit: AuditRow, items: AuditItemRow[]): AuditReport {
  const answered = items.filter((i) => i.animal !== null);
  const k = answered.filter((i) => i.animal === 1).length;
  const n = answered.length;
  const N = audit.population;
  const finite = n > FINITE_SHARE * N;
  let share: AuditReport['share'];
  if (n === 0) share = { estimate: 0, lower: 0, upper: 1, method: finite ? 'hypergeometric' : 'clopper-pearson' };
  else if (finite) {
    const two = hypergeometricBounds(k, N, n, audit.alpha / 2);
    share = { estimate: k / n, lower: two.lower / N, upper: two.upper / N, method: 'hypergeometric' };
  } else share = { ...clopperPearson(k, n, audit.alpha), method: 'clopper-pearson' };
  const upperOne = shareUpperBound(k, n, N, audit.alpha);
  const strata = (JSON.parse(audit.strata) as Stratum[]).map((s) => {
    const mine = answered.filter((i) => i.stratum === s.band);
    return { ...s, answered: mine.length, animals: mine.filter((i) => i.animal === 1).length };
  });
  return {
    id: audit.id,
    createdAt: audit.created_at,
    who: audit.who,
    seed: audit.seed,
    population: N,
    sampleSize: audit.sample_size,
    answered: n,
    animals: k,
    tolerance: audit.tolerance,
    alpha: audit.alpha,
    share,
    shareUpperOneSided: upperOne,
    missedEvents: { estimate: share.estimate * N, lower: Math.floor(share.lower * N + 1e-9), upper: Math.ceil(share.upper * N - 1e-9) },
    verdict: n < audit.sample_size ? 'incomplete' : upperOne < audit.tolerance ? 'pass' : 'fail',
    zeroMissSampleSize: zeroMissPlan(audit.tolerance, audit.alpha, N),
    strata,
    items,
  };
}

/** How many set-aside events there are to audit now (the plan's population). */
export function setAsideCount(ledger: string): number {
  const db = openLedger(ledger);
  try {
    return createAuditStore(db).population().length;
  } finally {
    db.close();
  }
}

export function loadAuditReport(ledger: string, id?: number): AuditReport {
  const db = openLedger(ledger);
  try {
    const store = createAuditStore(db);
    const audit = store.audit(id);
    if (!audit) throw new MovesiftError(AuditErrorCode.unknownAudit, id === undefined ? 'no audit has been drawn in this ledger yet' : `no audit ${id} in this ledger`);
    return reportAudit(audit, store.items(audit.id));
  } finally {
    db.close();
  }
}
