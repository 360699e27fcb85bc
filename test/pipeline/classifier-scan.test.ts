/**
 * A scan with the shipped change classifier (models/change-classifier.json), through the
 * command line as a user runs it: every image event carries the classifier's opinion and its
 * rule; the second pass applies the rule again from what the ledger keeps (an opinion made low
 * turns an unsure event likely-blank under rule `classifier`, and raised again gives it back);
 * a rescan with the same model skips every event and one without it screens them again; a
 * model that breaks its contract stops the scan before any ledger is made.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { openLedger } from '../../src/ledger/open-ledger.js';
import { deploymentPass } from '../../src/pipeline/deployment-pass.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';

const MANIFEST = path.join(ROOT, 'models/change-classifier.json');

interface Row { id: string; score: number; verdict: string; rule: string | null; features: string }

describe('scan --classifier', () => {
  it('records the second opinion, and the second pass applies its rule again', () => {
    const dir = tempDir('movesift-cls-');
    const ledger = path.join(dir, 'c.ledger');
    const r = runCli(['scan', 'sample-media/creek-bend', '--ledger', ledger, '--classifier', MANIFEST, '--workers', '1']);
    expect(r.code, r.stderr).toBe(0);
    const db = openLedger(ledger);
    const rows = db.prepare("SELECT e.id, a.score, a.verdict, a.rule, a.features FROM events e JOIN analyses a ON a.event_id = e.id WHERE e.kind != 'clip'").all() as Row[];
    expect(rows.length).toBeGreaterThan(5);
    const manifest = JSON.parse(fs.readFileSync(MANIFEST, 'utf8'));
    for (const row of rows) {
      const c = JSON.parse(row.features).classifier;
      expect(c.model).toBe('change-classifier');
      expect(c.sha256).toBe(manifest.sha256);
      expect(c.rule).toEqual(manifest.combine);
      expect(c.crops.length).toBeLessThanOrEqual(manifest.cropsPerEvent);
      // The opinion is the most subject-like crop (0 with no track to crop).
      expect(c.score).toBeCloseTo(Math.max(0, ...c.crops.map((x: { p: number }) => x.p)), 4);
      if (c.drivenBy === 'classifier') expect([row.verdict, row.rule]).toEqual(['likely-blank', 'classifier']);
      else expect(row.verdict).toBe(c.motionVerdict);
    }
    // An event with a background and steady light, its motion score set to 0.5 (motion by the motion model, below
    // the ceiling) as another place would score it: with its stored opinion made low, the pass
    // calls it likely-blank by the classifier.
    const target = rows.find((row) => {
      const f = JSON.parse(row.features);
      return !f.context.noBackground && !f.context.movingLight;
    });
    expect(target, 'an event the classifier could overrule').toBeDefined();
    db.prepare("UPDATE analyses SET score = 0.5, verdict = 'motion', rule = NULL WHERE event_id = ?").run(target!.id);
    const setOpinion = db.prepare("UPDATE analyses SET features = json_set(features, '$.classifier.score', ?) WHERE event_id = ?");
    const dep = (db.prepare('SELECT deployment_id AS d FROM events WHERE id = ?').get(target!.id) as { d: string }).d;
    const state = () => db.prepare('SELECT verdict, rule FROM analyses WHERE event_id = ?').get(target!.id);
    setOpinion.run(manifest.combine.classifierBlank / 2, target!.id);
    deploymentPass(db, [dep], { raise: false });
    expect(state()).toEqual({ verdict: 'likely-blank', rule: 'classifier' });
    expect(deploymentPass(db, [dep], { raise: false }).changed).toBe(0);
    setOpinion.run(0.9, target!.id);
    deploymentPass(db, [dep], { raise: false });
    expect(state()).toEqual({ verdict: 'motion', rule: 'model' });
    db.close();

    const again = runCli(['scan', 'sample-media/creek-bend', '--ledger', ledger, '--classifier', MANIFEST, '--workers', '1']);
    expect(again.stdout).toMatch(/\(0 screened now, \d+ unchanged and skipped\)/);
    const without = runCli(['scan', 'sample-media/creek-bend', '--ledger', ledger, '--workers', '1']);
    expect(without.stdout).toMatch(/\((\d+) screened now, 0 unchanged and skipped\)/);
    const plain = openLedger(ledger);
    expect((plain.prepare("SELECT count(*) AS n FROM analyses WHERE json_extract(features, '$.classifier') IS NOT NULL").get() as { n: number }).n).toBe(0);
    plain.close();
  }, 300_000);

  it('refuses a model that breaks its contract before making a ledger', () => {
    const dir = tempDir('movesift-cls-bad-');
    fs.copyFileSync(path.join(ROOT, 'models/change-classifier.onnx'), path.join(dir, 'change-classifier.onnx'));
    const m = JSON.parse(fs.readFileSync(MANIFEST, 'utf8'));
    fs.writeFileSync(path.join(dir, 'm.json'), JSON.stringify({ ...m, sha256: 'f'.repeat(64) }));
    const ledger = path.join(dir, 'x.ledger');
    const r = runCli(['scan', 'sample-media/creek-bend', '--ledger', ledger, '--classifier', path.join(dir, 'm.json')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/SHA-256 is [0-9a-f]{64}, the manifest says f{64}/);
    expect(fs.existsSync(ledger)).toBe(false);
  });
});
