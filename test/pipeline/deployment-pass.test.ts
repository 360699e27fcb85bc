/**
 * The scan's second pass on a real ledger: the sample deployments scanned by the command line
 * (too small for a calibration of their own: the scan says so), then grown to full deployments
 * with scores set to two invented places: a quiet creek whose false triggers score above the
 * fitted threshold (the premise holds: calibration applies) and a ridge trail that is mostly
 * animals (the premise fails: it steps back). Checked: which rule decided each verdict, that a
 * verdict a person acted on is left alone, that running the pass again changes nothing, that
 * people's label calibration takes precedence, and what the report carries. Then the incremental
 * part: a card added later screens only the events it changed.
 */
import { copyFileSync, mkdirSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { openLedger } from '../../src/ledger/open-ledger.js';
import { createReviewQueries } from '../../src/ledger/review-queries.js';
import { fillSynthetic } from '../../src/ledger/synthetic-fill.js';
import { CALIBRATION_CAP } from '../../src/kernels/deployment-calibration.js';
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { deploymentPass } from '../../src/pipeline/deployment-pass.js';
import { buildReport } from '../../src/pipeline/report.js';
import { makeRng } from '../../tools/scenes/random.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';

const BLANK = MOTION_MODEL.thresholds.blank;

describe('pass two: per-deployment calibration in the ledger', () => {
  it('calibrates a mostly-false deployment, steps back on a busy one, and leaves decided events alone', () => {
    // A card of five triggers: the scan says it is too small for a calibration of its own.
    const small = tempDir('movesift-pass-small-');
    mkdirSync(path.join(small, 'ridge-short'));
    for (let i = 1; i <= 15; i++) copyFileSync(path.join(ROOT, `sample-media/ridge-trail/IMG_${String(i).padStart(4, '0')}.JPG`), path.join(small, 'ridge-short', `IMG_${String(i).padStart(4, '0')}.JPG`));
    const few = runCli(['scan', small, '--ledger', path.join(small, 's.ledger'), '--deployment-cut']);
    expect(few.code, few.stderr).toBe(0);
    expect(few.stderr).toMatch(/ridge-short \(colour\): \d+ event\(s\) with a background and any motion, too few \(12 needed\) for its own calibration; the fitted threshold is used/);

    const ledger = path.join(tempDir('movesift-pass-'), 'p.ledger');
    const scan = runCli(['scan', 'sample-media/creek-bend', 'sample-media/ridge-trail', '--ledger', ledger]);
    expect(scan.code, scan.stderr).toBe(0);
    const db = openLedger(ledger);
    fillSynthetic(db, 400);
    // Invented scores: creek-bend's false triggers around 0.35 (above the fitted threshold,
    // logit spread 0.35), one in ten an animal at 0.9 or more; ridge-trail mostly animals.
    const rng = makeRng(5);
    const ids = (dep: string) => (db.prepare("SELECT e.id FROM events e WHERE e.deployment_id = ? AND e.kind != 'clip' ORDER BY e.start_sort_ms, e.id").all(dep) as Array<{ id: string }>).map((r) => r.id);
    const set = db.prepare("UPDATE analyses SET score = ?, verdict = ?, rule = NULL, features = json_set(features, '$.context', json('{}')) WHERE event_id = ?");
    const sig = (z: number) => 1 / (1 + Math.exp(-z));
    const truth = new Map<string, boolean>();
    db.transaction(() => {
      ids('creek-bend').forEach((id, i) => {
        const animal = i % 10 === 0;
        const score = animal ? 0.9 + 0.09 * rng.next() : sig(Math.log(0.35 / 0.65) + 0.35 * rng.normal());
        truth.set(id, animal);
        set.run(score, score < BLANK ? 'likely-blank' : score < MOTION_MODEL.thresholds.motion ? 'unsure' : 'motion', id);
      });
      ids('ridge-trail').forEach((id, i) => {
        const animal = i % 4 !== 0;
        const score = animal ? 0.85 + 0.14 * rng.next() : 0.4;
        set.run(score, score < BLANK ? 'likely-blank' : 'motion', id);
      });
    })();
    // A person already kept a few of creek-bend's false triggers: their verdicts stay as seen.
    const q = createReviewQueries(db);
    const decided = ids('creek-bend').filter((id, i) => i % 10 === 5).slice(0, 5);
    q.decide(decided, 'keep', 'one', 'tester');
    const verdictOf = (id: string) => db.prepare('SELECT verdict, rule FROM analyses WHERE event_id = ?').get(id) as { verdict: string; rule: string | null };
    const before = new Map(decided.map((id) => [id, verdictOf(id)]));

    // Not asked for (the default), the statistics are recorded and the fitted threshold decides.
    const off = deploymentPass(db, ['creek-bend', 'ridge-trail'], { raise: false });
    expect(off.rows.map((r) => r.status)).toEqual(['off', 'off']);
    expect(off.rows.every((r) => r.cut === BLANK)).toBe(true);
    expect(ids('creek-bend').every((id) => verdictOf(id).rule !== 'deployment')).toBe(true);

    const first = deploymentPass(db, ['creek-bend', 'ridge-trail'], { raise: true });
    // Each sample deployment was shot in one light mode.
    expect(first.rows.map((r) => r.deployment).sort()).toEqual(['creek-bend', 'ridge-trail']);
    const creek = first.rows.find((r) => r.deployment === 'creek-bend')!;
    const ridge = first.rows.find((r) => r.deployment === 'ridge-trail')!;
    expect(creek.status).toBe('applied');
    expect(creek.cut).toBeGreaterThan(BLANK);
    expect(creek.cut).toBeLessThanOrEqual(CALIBRATION_CAP);
    expect(ridge.status).toBe('busy');
    expect(ridge.cut).toBe(BLANK);
    // Creek: no animal blank; many false triggers now blank by the deployment's rule.
    const creekRows = ids('creek-bend').map((id) => ({ id, animal: truth.get(id)!, ...verdictOf(id) }));
    expect(creekRows.filter((r) => r.animal && r.verdict === 'likely-blank')).toEqual([]);
    const byDeployment = creekRows.filter((r) => r.rule === 'deployment');
    expect(byDeployment.length).toBeGreaterThan(20);
    expect(byDeployment.every((r) => r.verdict === 'likely-blank' && !r.animal)).toBe(true);
    // Ridge: nothing decided by the deployment; its false triggers at 0.4 stay as the model said.
    expect(ids('ridge-trail').every((id) => verdictOf(id).rule === 'model')).toBe(true);
    expect(ids('ridge-trail').filter((id) => verdictOf(id).verdict === 'likely-blank')).toEqual([]);
    // Decided events are as the person saw them.
    for (const [id, v] of before) expect(verdictOf(id)).toEqual(v);

    // Idempotent: the same statistics, nothing changes.
    expect(deploymentPass(db, ['creek-bend', 'ridge-trail'], { raise: true }).changed).toBe(0);

    // People's label calibration in force: it decides, the unlabelled estimate steps aside.
    db.prepare("INSERT INTO calibrations (at, who, target_recall, threshold, animals, recall_lower, applied, changed) VALUES ('2026-12-05T08:00:00Z', 'tester', 0.99, 0.2, 300, 0.99, 1, 0)").run();
    const labelled = deploymentPass(db, ['creek-bend'], { raise: true });
    expect(labelled.rows.every((r) => r.status === 'labels' && r.cut === 0.2)).toBe(true);
    expect(ids('creek-bend').filter((id) => !decided.includes(id)).every((id) => verdictOf(id).rule === 'model')).toBe(true);
    db.prepare('DELETE FROM calibrations').run();
    deploymentPass(db, ['creek-bend', 'ridge-trail'], { raise: true });
    db.close();

    // The report names the rule of each event and carries the calibrations.
    const report = buildReport(ledger);
    expect(report.calibrations.find((c) => c.deployment === 'creek-bend')).toMatchObject({ status: 'applied', light: creek.light });
    expect(report.calibrations.find((c) => c.deployment === 'ridge-trail')).toMatchObject({ status: 'busy' });
    expect(report.events.filter((e) => e.rule === 'deployment').length).toBe(byDeployment.length);
    expect(report.events.every((e) => e.rule === 'model' || e.verdict === 'likely-blank')).toBe(true);
  });

  it('screens again, after a new card, only the new events and those whose neighbouring triggers it changed', () => {
    // ridge-trail's first 26 files are 10 events; files 27-32 add 2 more at the end. Each image
    // event takes its six nearest triggers (three each side, more on one side at an end): only
    // the last three of the first ten get a new one.
    const dir = tempDir('movesift-pass-inc-');
    const card = path.join(dir, 'ridge');
    mkdirSync(card);
    const copy = (from: number, to: number) => {
      for (let i = from; i <= to; i++) copyFileSync(path.join(ROOT, `sample-media/ridge-trail/IMG_${String(i).padStart(4, '0')}.JPG`), path.join(card, `IMG_${String(i).padStart(4, '0')}.JPG`));
    };
    const ledger = path.join(dir, 'i.ledger');
    copy(1, 26);
    const first = runCli(['scan', dir, '--ledger', ledger]);
    expect(first.stdout).toMatch(/into 10 event\(s\) .*\(10 screened now, 0 unchanged and skipped\)/);
    copy(27, 32);
    const second = runCli(['scan', dir, '--ledger', ledger]);
    expect(second.stdout).toMatch(/into 12 event\(s\) .*\(5 screened now, 7 unchanged and skipped\)/);
  });
});
