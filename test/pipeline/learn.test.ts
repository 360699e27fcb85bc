/**
 * `movesift learn` on a ledger: the sample deployments scanned by the command line, then grown
 * to a full deployment (synthetic-fill.ts) whose scores and features are set to an invented
 * place: a hillside where wind-tossed grass scores as high on motion as the animals do, and what
 * tells them apart is that grass never stays put (the best track's persistence). People decide
 * the first 60 events. Checked: with five decisions it refuses, saying how many more of each;
 * with 60 it prints its out-of-fold recall and blank share and changes nothing; with --use it
 * keeps the model (its ONNX file's hash, the decisions it learned from) and the undecided events
 * are re-judged: every remaining animal kept, more likely-blank than before, each such call marked
 * `learned`; a second pass changes nothing; --forget gives the verdicts back.
 */
import { createHash } from 'node:crypto';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { openLedger } from '../../src/ledger/open-ledger.js';
import { fillSynthetic } from '../../src/ledger/synthetic-fill.js';
import { deploymentPass } from '../../src/pipeline/deployment-pass.js';
import { FEATURE_NAMES } from '../../src/kernels/score.js';
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { makeRng } from '../../tools/scenes/random.js';
import { runCli, tempDir } from '../helpers/cli.js';

describe('movesift learn', () => {
  it('refuses too few decisions, learns from 60, and decides the rest of its deployment when used', () => {
    const ledger = path.join(tempDir('movesift-learn-'), 'l.ledger');
    const scan = runCli(['scan', 'sample-media/creek-bend', '--ledger', ledger]);
    expect(scan.code, scan.stderr).toBe(0);
    const db = openLedger(ledger);
    fillSynthetic(db, 160);
    const ids = (db.prepare("SELECT id FROM events WHERE deployment_id = 'creek-bend' AND kind != 'clip' ORDER BY start_sort_ms, id").all() as Array<{ id: string }>).map((r) => r.id);
    expect(ids.length).toBeGreaterThanOrEqual(150);
    const rng = makeRng(9);
    const truth = new Map<string, boolean>();
    const set = db.prepare("UPDATE analyses SET score = ?, verdict = ?, rule = NULL, features = json_set(json_set(features, '$.best', json(?)), '$.context', json('{}')) WHERE event_id = ?");
    db.transaction(() => {
      ids.forEach((id, i) => {
        const animal = i % 4 === 0;
        const best = FEATURE_NAMES.map(() => Math.round(rng.normal() * 1000) / 1000);
        best[2] = animal ? 0.8 + 0.2 * rng.next() : 0.15 + 0.45 * rng.next(); // persistence
        const score = animal ? 0.45 + 0.5 * rng.next() : 0.4 + 0.5 * rng.next();
        truth.set(id, animal);
        set.run(score, score < MOTION_MODEL.thresholds.motion ? 'unsure' : 'motion', JSON.stringify(best), id);
      });
    })();
    const decide = db.prepare("INSERT INTO decisions (event_id, decision, source, who, at) VALUES (?, ?, 'single', 'tester', '2026-12-05T10:00:00Z')");
    const decideFirst = (n: number) => db.transaction(() => ids.slice(0, n).forEach((id) => decide.run(id, truth.get(id) ? 'keep' : 'set-aside')))();
    decideFirst(5);
    const blankNow = () => (db.prepare("SELECT count(*) AS n FROM analyses a JOIN events e ON e.id = a.event_id WHERE e.deployment_id = 'creek-bend' AND a.verdict = 'likely-blank'").get() as { n: number }).n;
    deploymentPass(db, ['creek-bend'], { raise: false });
    const before = blankNow();

    const few = runCli(['learn', ledger]);
    expect(few.code).toBe(2);
    expect(few.stdout).toMatch(/creek-bend: not learned: too few decisions to learn from: 2 kept and 3 set aside; at least 10 of each are needed \(8 more kept and 7 more set aside\)/);

    decideFirst(60);
    const dry = runCli(['learn', ledger]);
    expect(dry.code, dry.stderr).toBe(0);
    const m = dry.stdout.match(/kept (\d+) of (\d+) kept events \(([\d.]+)%\), called (\d+) of (\d+) set-aside events blank/);
    expect(m, dry.stdout).not.toBeNull();
    expect(Number(m![3])).toBeGreaterThanOrEqual(90);
    expect(Number(m![4])).toBeGreaterThan(0.5 * Number(m![5]));
    expect(dry.stdout).toMatch(/Nothing changed/);
    expect(blankNow()).toBe(before);

    const used = runCli(['learn', ledger, '--use', '--who', 'lead']);
    expect(used.code, used.stderr).toBe(0);
    const kept = db.prepare('SELECT sha256, onnx, model, who FROM learned_models WHERE active = 1').get() as { sha256: string; onnx: Buffer; model: string; who: string };
    expect(createHash('sha256').update(kept.onnx).digest('hex')).toBe(kept.sha256);
    expect(JSON.parse(kept.model).learnedFrom).toEqual(ids.slice(0, 60));
    expect(kept.who).toBe('lead');
    const rest = db.prepare("SELECT e.id, a.verdict, a.rule FROM events e JOIN analyses a ON a.event_id = e.id LEFT JOIN latest_decisions ld ON ld.event_id = e.id WHERE e.deployment_id = 'creek-bend' AND ld.decision IS NULL").all() as Array<{ id: string; verdict: string; rule: string }>;
    const animals = rest.filter((r) => truth.get(r.id));
    expect(animals.length).toBeGreaterThan(15);
    expect(animals.filter((r) => r.verdict === 'likely-blank')).toEqual([]);
    expect(blankNow()).toBeGreaterThan(before + 20);
    for (const r of rest) if (r.verdict === 'likely-blank') expect(r.rule).toBe('learned');
    expect(deploymentPass(db, ['creek-bend'], { raise: false }).changed).toBe(0);

    const forget = runCli(['learn', ledger, '--forget']);
    expect(forget.code, forget.stderr).toBe(0);
    expect(blankNow()).toBe(before);
    db.close();
  }, 300_000);
});
