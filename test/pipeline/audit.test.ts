/**
 * movesift audit on a ledger scanned from sample-media: a seeded draw is reproducible and
 * stratified by score band with proportional allocation; answers are append-only with who and
 * when; the report's numbers come from the exact intervals (checked against @stdlib in
 * test/shared/stats.test.ts) and pass only when the one-sided upper bound is under the
 * tolerance; a sample over 5% of the population switches to the hypergeometric bounds.
 */
import path from 'node:path';
import Database from 'better-sqlite3';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli, tempDir } from '../helpers/cli.js';
import { clopperPearsonUpper } from '../../src/shared/stats/binomial.js';
import { hypergeometricBounds } from '../../src/shared/stats/hypergeometric.js';
import { reportAudit, zeroMissPlan } from '../../src/pipeline/audit.js';

describe('movesift audit', () => {
  const ledger = path.join(tempDir('movesift-audit-'), 'a.ledger');
  beforeAll(() => {
    expect(runCli(['scan', 'sample-media/ridge-trail', 'sample-media/creek-bend', '--ledger', ledger]).code).toBe(0);
    for (const v of ['likely-blank', 'unsure']) expect(runCli(['decide', ledger, '--set-aside', '--verdict', v]).code).toBe(0);
  }, 120_000);

  it('plans 299 checks for a 1% tolerance', () => {
    expect(runCli(['audit', '--plan', '--tolerance', '0.01']).stdout).toContain('Check 299 ');
  });

  it('plans for a finite population by the exact hypergeometric bound (pure; brute-force reference)', () => {
    // Brute force: with none of n checks an animal, the report passes when no M >= tolerance * N
    // animals among N leaves P(X = 0) above alpha; P(X = 0 | M) = prod_{i<n} (N - M - i) / (N - i).
    const brute = (tol: number, alpha: number, N: number) => {
      const M = Math.ceil(tol * N - 1e-12);
      for (let n = 1; n <= N; n++) {
        if (n <= 0.05 * N) {
          if (clopperPearsonUpper(0, n, alpha) < tol) return n;
          continue;
        }
        let p = 1;
        for (let i = 0; i < n; i++) p *= (N - M - i) / (N - i);
        if (p <= alpha) return n;
      }
      return N;
    };
    for (const [tol, N] of [[0.05, 200], [0.01, 11], [0.02, 500], [0.01, 1000], [0.1, 30]] as const) expect(zeroMissPlan(tol, 0.05, N), `${tol} of ${N}`).toBe(brute(tol, 0.05, N));
    expect(zeroMissPlan(0.01, 0.05, 11)).toBe(11);
    expect(zeroMissPlan(0.01, 0.05, 100_000)).toBe(299);
    expect(zeroMissPlan(0.01, 0.05)).toBe(299);
  });

  it('refuses to draw from a ledger with nothing set aside', () => {
    const empty = path.join(tempDir('movesift-audit-empty-'), 'e.ledger');
    expect(runCli(['scan', 'sample-media/ridge-trail', '--ledger', empty]).code).toBe(0);
    const r = runCli(['audit', empty, '--sample', '5']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('nothing to audit');
  });

  it('draws the same sample for the same seed, stratified in proportion to the score bands', () => {
    const a = runCli(['audit', ledger, '--sample', '4', '--seed', '42', '--strata', '2', '--json']);
    expect(a.code, a.stderr).toBe(0);
    const b = runCli(['audit', ledger, '--sample', '4', '--seed', '42', '--strata', '2']);
    expect(b.code).toBe(0);
    const db = new Database(ledger, { readonly: true });
    const items = (id: number) => (db.prepare('SELECT event_id, stratum FROM audit_items WHERE audit_id = ? ORDER BY position').all(id) as Array<{ event_id: string; stratum: number }>);
    const audits = db.prepare('SELECT id, population, strata FROM audits ORDER BY id').all() as Array<{ id: number; population: number; strata: string }>;
    const [first, second] = [items(audits[0].id), items(audits[1].id)];
    db.close();
    expect(first).toEqual(second);
    const strata = JSON.parse(audits[0].strata) as Array<{ population: number; sample: number; scoreTo: number; scoreFrom: number }>;
    const n = Math.min(4, audits[0].population);
    expect(audits[0].population).toBeGreaterThanOrEqual(4);
    expect(strata.reduce((s, x) => s + x.sample, 0)).toBe(n);
    expect(strata.reduce((s, x) => s + x.population, 0)).toBe(audits[0].population);
    for (const s of strata) expect(Math.abs(s.sample - (n * s.population) / audits[0].population)).toBeLessThan(1);
    expect(strata[0].scoreTo).toBeLessThanOrEqual(strata[1].scoreFrom);
  });

  it('records answers with who and when, reports the exact bounds, and passes only under the tolerance', () => {
    const r = runCli(['audit', ledger, '--sample', '6', '--seed', '7', '--json']);
    expect(r.code).toBe(0);
    const db = new Database(ledger, { readonly: true });
    const audit = db.prepare('SELECT id, population FROM audits ORDER BY id DESC LIMIT 1').get() as { id: number; population: number };
    const drawn = (db.prepare('SELECT event_id FROM audit_items WHERE audit_id = ? ORDER BY position').all(audit.id) as Array<{ event_id: string }>).map((x) => x.event_id);
    db.close();
    const answers = drawn.map((e, i) => `${e}=${i === 0 ? 'yes' : 'no'}`);
    const half = runCli(['audit', ledger, '--who', 'lead', '--answer', answers[0], '--answer', answers[1], '--json']);
    expect(JSON.parse(half.stdout).verdict).toBe('incomplete');
    const done = runCli(['audit', ledger, '--who', 'lead', ...answers.slice(2).flatMap((a) => ['--answer', a]), '--json']);
    const rep = JSON.parse(done.stdout);
    expect(rep).toMatchObject({ answered: drawn.length, animals: 1, verdict: 'fail' });
    // n over 5% of the population: the finite-population bounds.
    expect(rep.share.method).toBe('hypergeometric');
    expect(rep.share.upper).toBeCloseTo(hypergeometricBounds(1, audit.population, drawn.length, 0.025).upper / audit.population, 12);
    expect(rep.missedEvents.estimate).toBeCloseTo(audit.population / drawn.length, 9);
    const check = new Database(ledger);
    const rows = check.prepare('SELECT who, at FROM audit_answers WHERE audit_id = ?').all(audit.id) as Array<{ who: string; at: string }>;
    expect(rows.every((x) => x.who === 'lead' && !Number.isNaN(Date.parse(x.at)))).toBe(true);
    expect(() => check.prepare('DELETE FROM audit_answers').run()).toThrow(/append-only/);
    check.close();
    const wrong = runCli(['audit', ledger, '--answer', 'e000000000000=yes']);
    expect(wrong.code).toBe(2);
    expect(wrong.stderr).toContain('was not drawn');
    expect(runCli(['audit', ledger, '--answer', 'nonsense']).code).toBe(2);
  });

  it('never plans more checks than there are set-aside events, and says when all must be checked', () => {
    const db = new Database(ledger, { readonly: true });
    const N = (db.prepare("SELECT count(*) AS n FROM latest_decisions WHERE decision = 'set-aside'").get() as { n: number }).n;
    db.close();
    expect(N).toBeGreaterThan(5);
    expect(N).toBeLessThan(40);
    const plan = runCli(['audit', ledger, '--plan', '--tolerance', '0.01']);
    expect(plan.code, plan.stderr).toBe(0);
    expect(plan.stdout).toContain(`Check all ${N} set-aside events`);
    const drawn = runCli(['audit', ledger, '--sample', '299', '--seed', '3']);
    expect(drawn.stdout).toContain(`drew ${N} of ${N} set-aside events (you asked for 299; that is every one of them)`);
    // Five answered "no": still incomplete, and the checks still needed are the population, not 299.
    const d2 = new Database(ledger, { readonly: true });
    const ids = (d2.prepare('SELECT event_id FROM audit_items WHERE audit_id = (SELECT max(id) FROM audits) ORDER BY position LIMIT 5').all() as Array<{ event_id: string }>).map((r) => r.event_id);
    d2.close();
    const r = runCli(['audit', ledger, ...ids.flatMap((e) => ['--answer', `${e}=no`]), '--json']);
    const report = JSON.parse(r.stdout.slice(r.stdout.indexOf('{')));
    expect(report.verdict).toBe('incomplete');
    expect(report.zeroMissSampleSize).toBe(N);
  });

  it('the report passes on a clean large sample and fails on the same with one animal (pure, no ledger)', () => {
    const audit = { id: 1, created_at: 'x', who: null, seed: 1, population: 100_000, sample_size: 299, tolerance: 0.01, alpha: 0.05, strata: JSON.stringify([{ band: 0, scoreFrom: 0, scoreTo: 1, population: 100_000, sample: 299 }]) };
    const items = Array.from({ length: 299 }, (_, i) => ({ position: i, event_id: `e${i}`, stratum: 0, score: 0, verdict: 'likely-blank', animal: 0, who: null, at: null }));
    const clean = reportAudit(audit, items);
    expect(clean.share.method).toBe('clopper-pearson');
    expect(clean.shareUpperOneSided).toBeCloseTo(clopperPearsonUpper(0, 299, 0.05), 12);
    expect(clean.verdict).toBe('pass');
    items[5].animal = 1;
    expect(reportAudit(audit, items).verdict).toBe('fail');
    const clean298 = items.slice(0, 298).map((x) => ({ ...x, animal: 0 }));
    expect(reportAudit({ ...audit, sample_size: 298 }, clean298).verdict).toBe('fail'); // one check short of proof
    expect(reportAudit(audit, items.map((x, i) => ({ ...x, animal: i < 3 ? null : 0 }))).verdict).toBe('incomplete');
  });
});
