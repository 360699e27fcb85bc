/**
 * The set-aside folder is judged on real paths and for dry runs too: a folder reached through a
 * symbolic link into the scanned tree is refused (issue 22, item 4: it was let through, and a
 * rescan then counted the set-aside media again), and `apply --dry-run` into a folder inside the
 * scanned tree says what the real apply says instead of "Would move" (issue 23, item 3).
 */
import { cpSync, existsSync, readdirSync, symlinkSync } from 'node:fs';
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
