/**
 * The set-aside folder is judged on real paths and for dry runs too: a folder reached through a
 * symbolic link into the scanned tree is refused (issue 22, item 4: it was let through, and a
 * rescan then counted the set-aside media again), and `apply --dry-run` into a folder inside the
 * scanned tree says what the real apply says instead of "Would move" (issue 23, item 3).
 * A refused apply says why in words and leaves no folder behind (issue 22, item 10), on real
 * small file systems (tmpfs mounts; skipped, with the reason, where this process may not mount).
 */
import { cpSync, existsSync, mkdirSync, readdirSync, symlinkSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { scan } from '../../src/pipeline/scan.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';

const dir = tempDir('movesift-target-');
const cards = path.join(dir, 'cards');
const ledger = path.join(dir, 'target.ledger');

beforeAll(async () => {
  cpSync(path.join(ROOT, 'sample-media/ridge-trail'), path.join(cards, 'ridge-trail'), { recursive: true });
  await scan({ roots: [cards], ledger });
  expect(runCli(['decide', ledger, '--set-aside', '--verdict', 'likely-blank']).code).toBe(0);
}, 120_000);

describe('where set-aside media may go', () => {
  it('refuses a folder that a link puts inside the scanned tree, and moves nothing', () => {
    const link = path.join(dir, 'looks-outside');
    symlinkSync(path.join(cards, 'ridge-trail'), link);
    for (const dry of [[], ['--dry-run']]) {
      const r = runCli(['apply', ledger, '--to', path.join(link, 'aside'), ...dry]);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).toMatch(/inside the scanned folder .* \(through a link/);
    }
    expect(readdirSync(path.join(cards, 'ridge-trail'))).toHaveLength(32);
    expect(existsSync(path.join(cards, 'ridge-trail', 'aside'))).toBe(false);
  });

  it('a dry run into a folder inside the scanned tree refuses as the real apply does', () => {
    const inside = path.join(cards, 'set-aside');
    const dry = runCli(['apply', ledger, '--to', inside, '--dry-run']);
    expect(dry.code).toBe(2);
    expect(dry.stdout).not.toMatch(/Would move/);
    expect(dry.stderr).toMatch(/is inside the scanned folder/);
    expect(existsSync(inside)).toBe(false);
  });

  it('a folder outside is still planned', () => {
    const r = runCli(['apply', ledger, '--to', path.join(dir, 'aside'), '--dry-run']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/Would move \d+ file/);
  });
});

/** Mounts a tmpfs of `size` at a new folder (read-only with `ro`); undefined when not allowed here. */
function tmpfs(size: string, ro = false): string | undefined {
  const at = tempDir('movesift-mnt-');
  const r = spawnSync('mount', ['-t', 'tmpfs', '-o', `size=${size}${ro ? ',ro' : ''}`, 'tmpfs', at], { encoding: 'utf8' });
  return r.status === 0 ? at : undefined;
}
const umount = (at: string): void => void spawnSync('umount', [at]);
const canMount = (() => {
  const at = tmpfs('64k');
  if (at) umount(at);
  return at !== undefined;
})();

describe.skipIf(!canMount)('a refused apply (needs permission to mount a tmpfs)', () => {
  it('into a read-only file system says so in words and moves nothing', () => {
    const at = tmpfs('1m', true)!;
    try {
      const r = runCli(['apply', ledger, '--to', path.join(at, 'season', 'aside')]);
      expect(r.code, r.stdout).toBe(2);
      expect(r.stderr).toContain('cannot write there (the file system is read-only, EROFS); nothing was moved');
      expect(r.stderr).not.toMatch(/\(ENOENT\)|\(EROFS\)/);
      expect(readdirSync(path.join(cards, 'ridge-trail'))).toHaveLength(32);
    } finally {
      umount(at);
    }
  });

  it('onto a disk too small names the disk and its space, and leaves no folder behind', () => {
    const at = tmpfs('64k')!;
    try {
      mkdirSync(path.join(at, 'existing'));
      const r = runCli(['apply', ledger, '--copy', '--to', path.join(at, 'existing', 'season', 'aside')]);
      expect(r.code, r.stdout).not.toBe(0);
      expect(r.stderr).toContain('E_APPLY_DISK_FULL');
      expect(r.stderr).toMatch(new RegExp(`the copies need [\\d.]+ kB but the disk mounted at ${at} has [\\d.]+ kB free; nothing was moved`));
      expect(readdirSync(path.join(at, 'existing'))).toEqual([]); // season/aside made and removed again
      expect(readdirSync(path.join(cards, 'ridge-trail'))).toHaveLength(32);
    } finally {
      umount(at);
    }
  });
});
