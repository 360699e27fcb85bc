/**
 * One writer per ledger (issue: a dry run rewrote a running apply's journal; two scans on one
 * ledger both ran): the lock file refuses a second writer with who holds it, is taken over from
 * a process that is gone, and is held by scan, apply and undo, while a dry run reads without it
 * and leaves the journal of a running apply alone.
 */
import { spawnSync } from 'node:child_process';
import { cpSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { acquireLedgerLock, lockFileOf } from '../../src/ledger/ledger-lock.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';

/** The pid of a process that has exited (so it is certainly not running). */
function deadPid(): number {
  const r = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  return Number(r.stdout);
}

describe('the ledger lock', () => {
  it('refuses a second holder with who holds it, and frees on release', () => {
    const ledger = path.join(tempDir('movesift-lock-'), 'l.ledger');
    const a = acquireLedgerLock(ledger, 'scan');
    expect(JSON.parse(readFileSync(lockFileOf(ledger), 'utf8'))).toMatchObject({ pid: process.pid, host: os.hostname(), command: 'scan' });
    expect(() => acquireLedgerLock(ledger, 'apply')).toThrowError(expect.objectContaining({ code: 'E_LEDGER_BUSY', message: expect.stringMatching(new RegExp(`in use by scan \\(process ${process.pid} on `)) }));
    a.release();
    expect(existsSync(lockFileOf(ledger))).toBe(false);
    acquireLedgerLock(ledger, 'apply').release();
  });

  it('takes over a lock whose process is gone, and says whose it was', () => {
    const ledger = path.join(tempDir('movesift-lock-stale-'), 'l.ledger');
    const pid = deadPid();
    writeFileSync(lockFileOf(ledger), JSON.stringify({ pid, host: os.hostname(), command: 'apply', since: '2026-12-05T08:00:00.000Z' }));
    const l = acquireLedgerLock(ledger, 'undo');
    expect(l.tookOver).toMatchObject({ pid, command: 'apply' });
    l.release();
  });

  it('is held by scan, apply and undo; a dry run reads without it and leaves a running apply journal alone', () => {
    const dir = tempDir('movesift-lock-cli-');
    const cards = path.join(dir, 'cards');
    cpSync(path.join(ROOT, 'sample-media/ridge-trail'), cards, { recursive: true });
    const ledger = path.join(dir, 'c.ledger');
    expect(runCli(['scan', cards, '--ledger', ledger]).code).toBe(0);
    expect(runCli(['decide', ledger, '--set-aside', '--verdict', 'likely-blank']).code).toBe(0);
    const aside = path.join(tempDir('movesift-lock-aside-'), 'aside');
    // As if an apply were running in another process: its lock held, one move half done.
    const held = acquireLedgerLock(ledger, 'apply');
    const db = new Database(ledger);
    db.prepare("INSERT INTO applies (started_at, target, mode, status, who) VALUES ('2026-12-05T08:00:00Z', ?, 'move', 'running', 'other')").run(aside);
    const media = db.prepare('SELECT m.id, em.event_id, m.rel_path, m.size FROM media m JOIN event_media em ON em.media_id = m.id LIMIT 1').get() as { id: number; event_id: string; rel_path: string; size: number };
    db.prepare("INSERT INTO moves (apply_id, media_id, event_id, source, dest, size, sha256, state, updated_at) VALUES (1, ?, ?, ?, ?, ?, 'x', 'moving', '2026-12-05T08:00:00Z')").run(media.id, media.event_id, path.join(cards, media.rel_path), path.join(aside, media.rel_path), media.size);
    db.close();
    for (const args of [['scan', cards, '--ledger', ledger], ['apply', ledger, '--to', aside], ['undo', ledger]]) {
      const r = runCli(args);
      expect(r.code, args[0]).toBe(2);
      expect(r.stderr).toMatch(/in use by apply \(process \d+ on .*\) since /);
    }
    const dry = runCli(['apply', ledger, '--to', aside, '--dry-run']);
    expect(dry.code, dry.stderr).toBe(0);
    const state = new Database(ledger, { readonly: true });
    expect(state.prepare('SELECT state FROM moves').all()).toEqual([{ state: 'moving' }]);
    state.close();
    held.release();
  });
});
