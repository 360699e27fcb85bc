/**
 * calibrate: refuses with too few labelled animals; on a large ledger its threshold and bound
 * equal an independent computation whose bound comes from @stdlib/stats-binomial-test (the
 * one-sided 95% lower bound is the lower end of the two-sided 90% interval). cut: each activity
 * window becomes a file whose length ffprobe confirms (exact mode to 0.15 s; stream copies never
 * shorter than their window), with an index and a MaxN sheet.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { openLedger } from '../../src/ledger/open-ledger.js';
import { createReviewQueries } from '../../src/ledger/review-queries.js';
import { fillSynthetic } from '../../src/ledger/synthetic-fill.js';
import { resolveBinaries } from '../../src/media/ffmpeg-binaries.js';
import { parseCsv } from '../../src/pipeline/deployments-table.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';

const binomialTest = createRequire(import.meta.url)('@stdlib/stats-binomial-test') as (k: number, n: number, o: { alpha: number }) => { ci: [number, number] };

describe('movesift calibrate', () => {
  it('refuses when too few animals are labelled, and says how many are needed', () => {
    const ledger = path.join(tempDir('movesift-cal-'), 'c.ledger');
    expect(runCli(['scan', 'sample-media/ridge-trail', '--ledger', ledger]).code).toBe(0);
    expect(runCli(['decide', ledger, '--keep', '--verdict', 'motion']).code).toBe(0);
    const r = runCli(['calibrate', ledger, '--recall', '0.99']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/needs at least 299/);
  });

  it('proposes the highest threshold whose 95% lower recall bound reaches the target, and re-verdicts only undecided events', async () => {
    const ledger = path.join(tempDir('movesift-cal-big-'), 'c.ledger');
    expect(runCli(['scan', 'sample-media', '--ledger', ledger]).code).toBe(0);
    const db = openLedger(ledger);
    fillSynthetic(db, 3000);
    const q = createReviewQueries(db);
    const rows = db.prepare('SELECT event_id, score FROM analyses ORDER BY score').all() as Array<{ event_id: string; score: number }>;
    // People kept what scored 0.2 or more (a few low ones too) and set aside the rest.
    const keep = rows.filter((r, i) => r.score >= 0.2 || i % 97 === 0).map((r) => r.event_id);
    const aside = rows.filter((r) => !keep.includes(r.event_id)).slice(0, 500).map((r) => r.event_id);
    q.decide(keep, 'keep', 'bulk', 'ci');
    q.decide(aside, 'set-aside', 'bulk', 'ci');
    db.close();
    const r = runCli(['calibrate', ledger, '--recall', '0.99']);
    expect(r.code, r.stderr).toBe(0);
    // Independent: walk up the kept scores while the stdlib bound holds.
    const scores = rows.filter((x) => keep.includes(x.event_id)).map((x) => x.score).sort((a, b) => a - b);
    let expected = 0;
    for (let i = 0; i < scores.length; i++) {
      if (binomialTest(scores.length - i, scores.length, { alpha: 0.1 }).ci[0] < 0.99) break;
      expected = scores[i];
    }
    expect(r.stdout).toContain(`Proposed likely-blank threshold: ${expected.toFixed(4)}`);
    const before = new Database(ledger, { readonly: true });
    const decided = before.prepare("SELECT a.event_id, a.verdict FROM analyses a JOIN latest_decisions d ON d.event_id = a.event_id WHERE d.decision IS NOT NULL ORDER BY 1").all();
    before.close();
    expect(runCli(['calibrate', ledger, '--recall', '0.99', '--apply']).code).toBe(0);
    const after = new Database(ledger, { readonly: true });
    expect(after.prepare("SELECT a.event_id, a.verdict FROM analyses a JOIN latest_decisions d ON d.event_id = a.event_id WHERE d.decision IS NOT NULL ORDER BY 1").all()).toEqual(decided);
    const undecided = after.prepare('SELECT a.score, a.verdict FROM analyses a LEFT JOIN latest_decisions d ON d.event_id = a.event_id WHERE d.decision IS NULL').all() as Array<{ score: number; verdict: string }>;
    expect(undecided.length).toBeGreaterThan(0);
    for (const u of undecided) expect(u.verdict === 'likely-blank').toBe(u.score < expected);
    expect((after.prepare('SELECT count(*) AS n FROM calibrations WHERE applied = 1').get() as { n: number }).n).toBe(1);
    after.close();
  }, 180_000);
});

describe('movesift cut', () => {
  const ledger = path.join(tempDir('movesift-cut-'), 'k.ledger');
  const probe = (file: string): number => Number(spawnSync(resolveBinaries().ffprobe, ['-v', 'error', '-show_entries', 'format=duration', '-of', 'csv=p=0', file], { encoding: 'utf8' }).stdout.trim());

  it.each([[false], [true]])('writes each activity window as a file with an index and a MaxN sheet (exact: %s)', (exact) => {
    if (exact === false) expect(runCli(['scan', path.join(ROOT, 'sample-media/reef-station'), '--ledger', ledger]).code).toBe(0);
    const out = path.join(path.dirname(ledger), exact ? 'exact' : 'copy');
    const r = runCli(['cut', ledger, '--out', out, ...(exact ? ['--exact'] : [])]);
    expect(r.code, r.stderr).toBe(0);
    const report = JSON.parse(runCli(['report', ledger]).stdout) as { events: Array<{ kind: string; windows: Array<{ start_s: number; end_s: number }> }> };
    const windows = report.events.find((e) => e.kind === 'clip')!.windows;
    const [head, ...index] = parseCsv(readFileSync(path.join(out, 'windows-index.csv'), 'utf8'));
    expect(index).toHaveLength(windows.length);
    const [, ...sheet] = parseCsv(readFileSync(path.join(out, 'maxn-sheet.csv'), 'utf8'));
    expect(sheet).toHaveLength(windows.length);
    index.forEach((row, i) => {
      const d = probe(path.join(out, row[head.indexOf('file')]));
      const want = windows[i].end_s - windows[i].start_s;
      if (exact) expect(Math.abs(d - want)).toBeLessThan(0.15);
      else expect(d).toBeGreaterThanOrEqual(want - 0.15);
    });
  }, 120_000);
});
