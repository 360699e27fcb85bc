/**
 * apply and undo, on copies of sample-media in temporary folders: files moved and put back with
 * the same bytes (SHA-256, node:crypto), nothing overwritten on a name clash, a changed file left
 * in place, copies across file systems verified (/dev/shm is tmpfs here), a full disk refused
 * before anything moves (a 64 KiB tmpfs, when this machine lets us mount one), and a crash
 * mid-apply (SIGKILL) finished or reversed by the next run with every file in exactly one place.
 */
import { createHash } from 'node:crypto';
import { cpSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { ROOT, runCli, startCli, tempDir } from '../helpers/cli.js';
import { openLedger } from '../../src/ledger/open-ledger.js';
import { createMoveStore } from '../../src/ledger/move-store.js';
import { withLedgerLock } from '../../src/ledger/ledger-lock.js';
import { recoverMoves } from '../../src/pipeline/recover-moves.js';

const sha = (f: string): string => createHash('sha256').update(readFileSync(f)).digest('hex');

function setup(decide: string[] = ['--verdict', 'likely-blank']): { dir: string; cards: string; ledger: string; hashes: Map<string, string> } {
  const dir = tempDir('movesift-apply-');
  const cards = path.join(dir, 'cards');
  cpSync(path.join(ROOT, 'sample-media/ridge-trail'), cards, { recursive: true });
  const ledger = path.join(dir, 'a.ledger');
  expect(runCli(['scan', cards, '--ledger', ledger]).code).toBe(0);
  expect(runCli(['decide', ledger, '--set-aside', ...decide]).code).toBe(0);
  const hashes = new Map(readdirSync(cards).map((f) => [f, sha(path.join(cards, f))]));
  return { dir, cards, ledger, hashes };
}
const rows = <T>(ledger: string, sql: string): T[] => {
  const db = new Database(ledger, { readonly: true });
  try {
    return db.prepare(sql).all() as T[];
  } finally {
    db.close();
  }
};

describe('movesift apply and undo', () => {
  it('dry run lists the files and bytes and moves nothing', () => {
    const { cards, ledger, dir } = setup();
    const r = runCli(['apply', ledger, '--to', path.join(dir, 'aside'), '--dry-run']);
    expect(r.code, r.stderr).toBe(0);
    const listed = r.stdout.split('\n').filter((l) => l.includes(' -> '));
    expect(listed.length).toBeGreaterThan(0);
    expect(r.stdout).toMatch(/Would move \d+ file\(s\), [\d.]+ MB/);
    expect(readdirSync(cards)).toHaveLength(32);
    expect(existsSync(path.join(dir, 'aside'))).toBe(false);
  });

  it('moves set-aside media with their bytes intact, journals and lists them, and undo puts every one back', () => {
    const { cards, ledger, dir, hashes } = setup();
    const aside = path.join(dir, 'aside');
    const r = runCli(['apply', ledger, '--to', aside]);
    expect(r.code, r.stderr).toBe(0);
    const moved = rows<{ source: string; dest: string; sha256: string; state: string; method: string }>(ledger, 'SELECT source, dest, sha256, state, method FROM moves');
    expect(moved.length).toBeGreaterThan(0);
    for (const m of moved) {
      expect(m).toMatchObject({ state: 'moved', method: 'rename' });
      expect(existsSync(m.source)).toBe(false);
      expect(sha(m.dest)).toBe(hashes.get(path.basename(m.source)));
      expect(m.sha256).toBe(hashes.get(path.basename(m.source)));
      expect(path.relative(aside, m.dest)).toBe(path.join('cards', path.basename(m.source)));
    }
    const manifest = readFileSync(path.join(aside, 'movesift-manifest-1.csv'), 'utf8').trim().split('\n');
    expect(manifest).toHaveLength(moved.length + 1);
    expect(runCli(['apply', ledger, '--to', aside]).stdout).toContain('No set-aside media left to move.');
    const u = runCli(['undo', ledger]);
    expect(u.code, u.stderr).toBe(0);
    expect(u.stdout).toContain(`Put back ${moved.length} file(s)`);
    for (const [f, h] of hashes) expect(sha(path.join(cards, f))).toBe(h);
    expect(rows<{ status: string }>(ledger, 'SELECT status FROM applies')[0].status).toBe('undone');
    // No empty folders left behind: the set-aside folder holds only its manifest again.
    expect(readdirSync(aside)).toEqual(['movesift-manifest-1.csv']);
    expect(runCli(['undo', ledger]).stdout).toContain('Nothing to put back: no file of this ledger is in a set-aside folder now.');
  });

  it('a rescan after apply keeps the set-aside events and their decisions, and after undo finds the files again', () => {
    const { cards, ledger, dir } = setup();
    const report = () => JSON.parse(runCli(['report', ledger]).stdout) as { events: Array<{ id: string; decision: string | null; verdict: string }>; errors: unknown[] };
    const before = report();
    expect(runCli(['apply', ledger, '--to', path.join(dir, 'aside')]).code).toBe(0);
    expect(runCli(['scan', cards, '--ledger', ledger]).code).toBe(0);
    const after = report();
    expect(after.events.map((e) => [e.id, e.decision, e.verdict])).toEqual(before.events.map((e) => [e.id, e.decision, e.verdict]));
    expect(after.errors).toEqual([]);
    expect(runCli(['undo', ledger]).code).toBe(0);
    expect(runCli(['scan', cards, '--ledger', ledger]).code).toBe(0);
    expect(report().events.map((e) => [e.id, e.decision])).toEqual(before.events.map((e) => [e.id, e.decision]));
  });

  it('an event kept after apply: decide says its files are set aside and how to bring them back; undo --events puts back only those', () => {
    const { cards, ledger, dir, hashes } = setup();
    const aside = path.join(dir, 'aside');
    expect(runCli(['apply', ledger, '--to', aside]).code).toBe(0);
    const moved = rows<{ event_id: string; rel_path: string }>(ledger, "SELECT v.event_id, m.rel_path FROM moves v JOIN media m ON m.id = v.media_id WHERE v.state = 'moved' ORDER BY v.id");
    const event = moved[0].event_id;
    const mine = moved.filter((m) => m.event_id === event).map((m) => path.basename(m.rel_path));
    const kept = runCli(['decide', ledger, '--keep', '--event', event]);
    expect(kept.code, kept.stderr).toBe(0);
    expect(kept.stdout).toContain(`1 of the kept event(s) have ${mine.length} file(s) in the set-aside folder still (moved by apply 1). To put them back:`);
    expect(kept.stdout).toContain(`movesift undo ${ledger} --events ${event}`);
    for (const f of mine) expect(existsSync(path.join(cards, f))).toBe(false); // deciding moves nothing
    const back = runCli(['undo', ledger, '--events', event]);
    expect(back.code, back.stderr).toBe(0);
    expect(back.stdout).toContain(`Put back ${mine.length} file(s) from apply 1.`);
    for (const f of mine) expect(sha(path.join(cards, f))).toBe(hashes.get(f));
    // The other events of that apply stay set aside; a second keep finds nothing left to bring back.
    const others = moved.filter((m) => m.event_id !== event);
    expect(others.length).toBeGreaterThan(0);
    for (const o of others) expect(existsSync(path.join(cards, path.basename(o.rel_path)))).toBe(false);
    expect(runCli(['decide', ledger, '--keep', '--event', event]).stdout).not.toContain('set-aside folder still');
    expect(runCli(['undo', ledger, '--events', 'nonsense']).code).toBe(2);
  });

  it('refuses a set-aside folder inside a scanned folder (exit 2) and overwrites nothing on a name clash', () => {
    const { cards, ledger, dir } = setup();
    expect(runCli(['apply', ledger, '--to', path.join(cards, 'aside')]).code).toBe(2);
    const aside = path.join(dir, 'aside');
    const dest = rows<{ rel_path: string }>(ledger, "SELECT m.rel_path FROM latest_decisions d JOIN event_media em ON em.event_id = d.event_id JOIN media m ON m.id = em.media_id WHERE d.decision = 'set-aside' ORDER BY m.rel_path DESC LIMIT 1")[0].rel_path;
    mkdirSync(path.join(aside, 'cards'), { recursive: true });
    writeFileSync(path.join(aside, 'cards', dest), 'someone else\'s file');
    const r = runCli(['apply', ledger, '--to', aside]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('E_APPLY_NAME_CLASH');
    expect(readFileSync(path.join(aside, 'cards', dest), 'utf8')).toBe('someone else\'s file');
    expect(readdirSync(cards)).toHaveLength(32); // checked before anything moved
  });

  it('leaves a file changed since the scan in place and moves the rest', () => {
    const { cards, ledger, dir } = setup();
    const first = rows<{ rel_path: string }>(ledger, "SELECT m.rel_path FROM latest_decisions d JOIN event_media em ON em.event_id = d.event_id JOIN media m ON m.id = em.media_id WHERE d.decision = 'set-aside' ORDER BY m.rel_path LIMIT 1")[0].rel_path;
    writeFileSync(path.join(cards, first), Buffer.concat([readFileSync(path.join(cards, first)), Buffer.from('edited')]));
    const r = runCli(['apply', ledger, '--to', path.join(dir, 'aside')]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('E_APPLY_SOURCE_CHANGED');
    expect(existsSync(path.join(cards, first))).toBe(true);
    expect(rows<{ n: number }>(ledger, "SELECT count(*) AS n FROM moves WHERE state = 'moved'")[0].n).toBeGreaterThan(0);
  });

  it.skipIf(!existsSync('/dev/shm') || statSync('/dev/shm').dev === statSync(tempDir()).dev)('copies across file systems with a SHA-256 check, and --copy keeps the originals', () => {
    const { cards, ledger, hashes } = setup();
    const aside = tempDirOn('/dev/shm');
    const r = runCli(['apply', ledger, '--to', aside]);
    expect(r.code, r.stderr).toBe(0);
    const moved = rows<{ dest: string; method: string; source: string }>(ledger, 'SELECT dest, method, source FROM moves');
    for (const m of moved) {
      expect(m.method).toBe('copy');
      expect(existsSync(m.source)).toBe(false);
      expect(sha(m.dest)).toBe(hashes.get(path.basename(m.source)));
    }
    expect(runCli(['undo', ledger]).code).toBe(0);
    const copyTo = tempDirOn('/dev/shm');
    expect(runCli(['apply', ledger, '--to', copyTo, '--copy']).code).toBe(0);
    expect(readdirSync(cards)).toHaveLength(32); // the originals stayed
    expect(rows<{ method: string }>(ledger, "SELECT method FROM moves WHERE state = 'moved'").every((m) => m.method === 'copy-kept')).toBe(true);
    expect(runCli(['undo', ledger]).code).toBe(0);
    expect(existsSync(path.join(copyTo, 'cards'))).toBe(false); // the copies are gone, the originals checked, and the folders apply made
  });

  it('refuses before moving anything when the disk has no room', () => {
    const { cards, ledger, dir } = setup();
    const small = path.join(dir, 'small');
    mkdirSync(small);
    const mounted = spawnSync('mount', ['-t', 'tmpfs', '-o', 'size=64k', 'tmpfs', small]).status === 0;
    if (!mounted) return console.log('skipped the full-disk case: cannot mount a small tmpfs here');
    try {
      const r = runCli(['apply', ledger, '--to', small]);
      expect(r.code).toBe(1);
      expect(r.stderr).toContain('E_APPLY_DISK_FULL');
      expect(readdirSync(cards)).toHaveLength(32);
    } finally {
      spawnSync('umount', [small]);
    }
  });

  it('puts back nothing that changed while set aside, and says so with exit 1', () => {
    const { ledger, dir } = setup();
    expect(runCli(['apply', ledger, '--to', path.join(dir, 'aside')]).code).toBe(0);
    const m = rows<{ dest: string; source: string }>(ledger, 'SELECT dest, source FROM moves LIMIT 1')[0];
    writeFileSync(m.dest, 'changed while set aside');
    const u = runCli(['undo', ledger]);
    expect(u.code).toBe(1);
    expect(u.stderr).toContain('E_UNDO_HASH_MISMATCH');
    expect(existsSync(m.source)).toBe(false);
    expect(readFileSync(m.dest, 'utf8')).toBe('changed while set aside');
  });

  it('refuses a read-only set-aside folder before moving anything (a read-only tmpfs, when mountable)', () => {
    const { cards, ledger, dir } = setup();
    const ro = path.join(dir, 'ro');
    mkdirSync(ro);
    const mounted = spawnSync('mount', ['-t', 'tmpfs', '-o', 'size=1m,ro', 'tmpfs', ro]).status === 0;
    if (!mounted) return console.log('skipped the read-only case: cannot mount a tmpfs here');
    try {
      const r = runCli(['apply', ledger, '--to', ro]);
      expect(r.code).toBe(2);
      expect(r.stderr).toContain('cannot write there');
      expect(readdirSync(cards)).toHaveLength(32);
      expect(rows<{ n: number }>(ledger, 'SELECT count(*) AS n FROM moves')[0].n).toBe(0);
    } finally {
      spawnSync('umount', [ro]);
    }
  });

  it('recovers crashes injected at each step: before the move, mid-copy, between copy and remove, mid-undo', async () => {
    const { cards, ledger, hashes } = setup();
    const aside = tempDirOn('/dev/shm');
    expect(runCli(['apply', ledger, '--to', aside]).code).toBe(0);
    const moved = rows<{ id: number; source: string; dest: string }>(ledger, "SELECT id, source, dest FROM moves WHERE state = 'moved' ORDER BY id");
    expect(moved.length).toBeGreaterThanOrEqual(4);
    const [a, b, c, d] = moved;
    const db = new Database(ledger);
    const set = db.prepare('UPDATE moves SET state = ? WHERE id = ?');
    // a: crashed after journalling "moving", before the file was touched: it is back home, not copied yet.
    cpSync(a.dest, a.source);
    rmSync(a.dest);
    set.run('moving', a.id);
    // b: crashed mid-copy: a partial temporary file beside the destination, the original at home.
    cpSync(b.dest, b.source);
    writeFileSync(b.dest + '.movesift-part', readFileSync(b.dest).subarray(0, 100));
    rmSync(b.dest);
    set.run('moving', b.id);
    // c: crashed between the verified copy and removing the original: the file is in both places.
    cpSync(c.dest, c.source);
    set.run('moving', c.id);
    // d: an undo crashed after putting the file home and before removing the set-aside copy.
    cpSync(d.dest, d.source);
    set.run('restoring', d.id);
    db.close();
    // The next apply or undo settles every one of them, under the ledger's lock, before doing
    // anything else (a dry run only reads: it must not touch a journal a live apply writes).
    const dry = runCli(['apply', ledger, '--to', aside, '--dry-run']);
    expect(dry.code, dry.stderr).toBe(0);
    expect(dry.stdout).not.toContain('An earlier run was interrupted');
    const held = openLedger(ledger);
    const recovered = await withLedgerLock(ledger, 'test', () => recoverMoves(createMoveStore(held)));
    held.close();
    expect(recovered).toMatchObject({ finished: 2, reversed: 2 });
    const state = new Map(rows<{ id: number; state: string }>(ledger, 'SELECT id, state FROM moves').map((m) => [m.id, m.state]));
    expect(state.get(a.id)).toBe('failed'); // reversed: the file never left home
    expect(existsSync(a.source) && !existsSync(a.dest)).toBe(true);
    expect(state.get(b.id)).toBe('failed'); // reversed: the partial copy is gone, the original home
    expect(existsSync(b.dest + '.movesift-part') || existsSync(b.dest)).toBe(false);
    expect(state.get(c.id)).toBe('moved'); // finished: the original removed once the copy checked out
    expect(existsSync(c.source)).toBe(false);
    expect(state.get(d.id)).toBe('restored'); // the undo finished: the set-aside copy removed
    expect(existsSync(d.dest)).toBe(false);
    // a, b and d are set-aside candidates again; this run moves them: every file whole, in one place.
    expect(runCli(['apply', ledger, '--to', aside]).code).toBe(0);
    for (const m of moved) {
      const home = existsSync(m.source), away = existsSync(m.dest);
      expect(home !== away, m.source).toBe(true);
      expect(sha(home ? m.source : m.dest)).toBe(hashes.get(path.basename(m.source)));
    }
    expect(runCli(['undo', ledger]).code).toBe(0);
    for (const [f, h] of hashes) expect(sha(path.join(cards, f))).toBe(h);
  });

  it('after a SIGKILL mid-apply, the next run leaves every file in exactly one place, whole', async () => {
    const dir = tempDir('movesift-apply-kill-');
    const cards = path.join(dir, 'cards');
    mkdirSync(cards);
    // Many files make the apply long enough to be killed mid-way: the sample images, copied 12 times.
    for (let k = 0; k < 12; k++) cpSync(path.join(ROOT, 'sample-media/ridge-trail'), path.join(cards, `d${k}`), { recursive: true });
    const ledger = path.join(dir, 'k.ledger');
    expect(runCli(['scan', cards, '--ledger', ledger, '--workers', '2']).code).toBe(0);
    for (const v of ['likely-blank', 'unsure', 'motion']) expect(runCli(['decide', ledger, '--set-aside', '--verdict', v]).code).toBe(0);
    const before = new Map<string, string>();
    for (const d of readdirSync(cards)) for (const f of readdirSync(path.join(cards, d))) before.set(`${d}/${f}`, sha(path.join(cards, d, f)));
    const aside = tempDirOn('/dev/shm', dir); // across file systems: copies, the slow path
    const child = startCli(['apply', ledger, '--to', aside]);
    // Kill it once some files have gone and many have not.
    const total = before.size;
    for (let t = 0; t < 600; t++) {
      await new Promise((r) => setTimeout(r, 25));
      const moved = existsSync(path.join(aside, 'cards')) ? readdirSync(path.join(aside, 'cards')).reduce((a, d) => a + readdirSync(path.join(aside, 'cards', d)).length, 0) : 0;
      if (moved >= 20) break;
    }
    child.kill('SIGKILL');
    await new Promise((r) => child.once('exit', r));
    const done = rows<{ n: number }>(ledger, "SELECT count(*) AS n FROM moves WHERE state = 'moved'")[0].n;
    console.log(`killed after ${done} of ${total} files were journalled as moved`);
    expect(done).toBeGreaterThan(0);
    expect(done).toBeLessThan(total);
    const again = runCli(['apply', ledger, '--to', aside]);
    expect(again.code, again.stderr).toBe(0);
    expect(rows<{ n: number }>(ledger, "SELECT count(*) AS n FROM moves WHERE state IN ('planned', 'moving', 'restoring')")[0].n).toBe(0);
    for (const [rel, h] of before) {
      const home = path.join(cards, rel), away = path.join(aside, 'cards', rel);
      expect(existsSync(home) !== existsSync(away), rel).toBe(true);
      expect(sha(existsSync(home) ? home : away)).toBe(h);
      expect(existsSync(away + '.movesift-part')).toBe(false);
    }
    expect(runCli(['undo', ledger]).code).toBe(0);
    for (const [rel, h] of before) expect(sha(path.join(cards, rel))).toBe(h);
  }, 240_000);
});

function tempDirOn(base: string, fallback?: string): string {
  const ok = existsSync(base) && statSync(base).dev !== statSync(tempDir()).dev;
  const dir = path.join(ok ? base : (fallback ?? tempDir()), `movesift-aside-${process.pid}-${Math.random().toString(36).slice(2)}`);
  mkdirSync(dir, { recursive: true });
  return dir;
}
