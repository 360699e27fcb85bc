/**
 * Migration 7 widens `analyses.rule` to the classifier's and the learned model's calls and keeps
 * every rule an older ledger held, with the analyses' previews and windows untouched.
 */
import Database from 'better-sqlite3';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { MIGRATIONS } from '../../src/ledger/migrations/index.js';
import { openLedger } from '../../src/ledger/open-ledger.js';
import { tempDir } from '../helpers/cli.js';

describe('migration 7', () => {
  it('keeps the rules and the rows that hang on analyses, and accepts `classifier`', () => {
    const f = path.join(tempDir(), 'six.ledger');
    const old = new Database(f);
    for (let v = 0; v < 6; v++) old.exec(MIGRATIONS[v]);
    old.pragma('user_version = 6');
    old.pragma('application_id = 0x4d565346');
    old.pragma('foreign_keys = OFF');
    const put = old.prepare(`INSERT INTO analyses (id, event_id, engine_version, param_hash, input_hash, analysis_width, analysis_height, score, verdict, features, detail, created_at, rule)
      VALUES (?, ?, 'v', 'p', 'i', 10, 10, 0.2, 'likely-blank', '{}', '{}', 'now', ?)`);
    put.run(1, 'e1', 'deployment');
    put.run(2, 'e2', 'model');
    put.run(3, 'e3', null);
    old.prepare("INSERT INTO previews (analysis_id, kind, position, path, width, height) VALUES (1, 'heat', 0, 'p.jpg', 10, 10)").run();
    expect(() => put.run(4, 'e4', 'classifier')).toThrow(/CHECK/);
    old.close();
    const db = openLedger(f);
    expect(db.pragma('user_version', { simple: true })).toBe(MIGRATIONS.length);
    expect(db.prepare('SELECT id, rule FROM analyses ORDER BY id').all()).toEqual([{ id: 1, rule: 'deployment' }, { id: 2, rule: 'model' }, { id: 3, rule: null }]);
    expect(db.prepare('SELECT count(*) AS n FROM previews').get()).toEqual({ n: 1 });
    db.prepare("UPDATE analyses SET rule = 'classifier' WHERE id = 2").run();
    db.prepare("UPDATE analyses SET rule = 'learned' WHERE id = 3").run();
    expect(db.prepare('SELECT count(*) AS n FROM learned_models').get()).toEqual({ n: 0 });
    expect(() => db.prepare("UPDATE analyses SET rule = 'guess' WHERE id = 2").run()).toThrow(/CHECK/);
    db.close();
  });
});
