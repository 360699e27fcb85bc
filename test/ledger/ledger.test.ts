/** The ledger file: migrations, pragmas, append-only decisions, refusal of foreign files. */
import Database from 'better-sqlite3';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { openLedger } from '../../src/ledger/open-ledger.js';
import { MIGRATIONS } from '../../src/ledger/migrations/index.js';
import { tempDir } from '../helpers/cli.js';

describe('openLedger', () => {
  it('creates a WAL ledger with foreign keys at the latest schema, and reopens it unchanged', () => {
    const f = path.join(tempDir(), 'sub', 'a.ledger');
    const db = openLedger(f, { create: true });
    expect(db.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(db.pragma('foreign_keys', { simple: true })).toBe(1);
    expect(db.pragma('user_version', { simple: true })).toBe(MIGRATIONS.length);
    db.close();
    const again = openLedger(f);
    expect(again.pragma('user_version', { simple: true })).toBe(MIGRATIONS.length);
    again.close();
  });
  it('brings a ledger an older version wrote up to date when it is opened only to be read', () => {
    const f = path.join(tempDir(), 'old.ledger');
    const old = new Database(f);
    for (let v = 0; v < MIGRATIONS.length - 1; v++) old.exec(MIGRATIONS[v]);
    old.pragma(`user_version = ${MIGRATIONS.length - 1}`);
    old.pragma('application_id = 0x4d565346');
    old.close();
    const db = openLedger(f, { readonly: true });
    expect(db.readonly).toBe(true);
    expect(db.pragma('user_version', { simple: true })).toBe(MIGRATIONS.length);
    expect(db.prepare("SELECT count(*) AS n FROM sqlite_master WHERE name = 'deployment_calibrations'").get()).toEqual({ n: 1 });
    db.close();
  });
  it('keeps the decisions log append-only', () => {
    const db = openLedger(path.join(tempDir(), 'b.ledger'), { create: true });
    db.prepare("INSERT INTO decisions (event_id, decision, source, at) VALUES ('e1', 'keep', 'single', '2025-01-01T00:00:00Z')").run();
    expect(() => db.prepare("UPDATE decisions SET decision = 'set-aside'").run()).toThrow(/append-only/);
    expect(() => db.prepare('DELETE FROM decisions').run()).toThrow(/append-only/);
    expect(() => db.prepare("INSERT INTO decisions (event_id, decision, source, at) VALUES ('e1', 'discard', 'single', 'x')").run()).toThrow(/CHECK/);
    db.close();
  });
  it('refuses a missing ledger, a foreign SQLite file, a non-database and a newer schema, each with its code', () => {
    const d = tempDir();
    expect(() => openLedger(path.join(d, 'none.ledger'))).toThrow(expect.objectContaining({ code: 'E_LEDGER_MISSING' }));
    const foreign = path.join(d, 'other.sqlite');
    const o = new Database(foreign);
    o.exec('CREATE TABLE t (x)');
    o.close();
    expect(() => openLedger(foreign)).toThrow(expect.objectContaining({ code: 'E_LEDGER_NOT_LEDGER' }));
    writeFileSync(path.join(d, 'text.ledger'), 'hello, not a database at all, really not');
    expect(() => openLedger(path.join(d, 'text.ledger'))).toThrow(expect.objectContaining({ code: 'E_LEDGER_NOT_LEDGER' }));
    const newer = path.join(d, 'newer.ledger');
    openLedger(newer, { create: true }).close();
    const n = new Database(newer);
    n.pragma(`user_version = ${MIGRATIONS.length + 1}`);
    n.close();
    expect(() => openLedger(newer)).toThrow(expect.objectContaining({ code: 'E_LEDGER_NEWER' }));
  });
});
