/**
 * Writes that cannot clobber (issue 22, item 1): `export --out` and `report --out`, and the
 * app's export request, never replace the ledger, a screened photo or another SQLite file, even
 * with --force (also through a symbolic link); an earlier export is replaced only with --force.
 * Each case checks the file afterwards by its SHA-256.
 */
import { createHash } from 'node:crypto';
import { cpSync, existsSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { scan } from '../../src/pipeline/scan.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';
import { createHandler } from '../../src/api/handler.js';

const sha = (f: string) => createHash('sha256').update(readFileSync(f)).digest('hex');
const dir = tempDir('movesift-out-');
const cards = path.join(dir, 'cards');
const ledger = path.join(dir, 'guard.ledger');
const photo = path.join(cards, 'ridge-trail', 'IMG_0001.JPG');

beforeAll(async () => {
  cpSync(path.join(ROOT, 'sample-media/ridge-trail'), path.join(cards, 'ridge-trail'), { recursive: true });
  await scan({ roots: [cards], ledger });
}, 120_000);

describe('outputs never replace what cannot be replaced', () => {
  it.each([
    ['export', ['--format', 'csv']],
    ['report', ['--format', 'json']],
  ])('%s --out refuses the ledger and a screened photo, even with --force, and through a link', (command, args) => {
    const before = { ledger: sha(ledger), photo: sha(photo) };
    const link = path.join(dir, `link-to-ledger-${command}`);
    symlinkSync(ledger, link);
    for (const target of [ledger, photo, link]) {
      for (const force of [[], ['--force']]) {
        const r = runCli([command, ledger, ...args, '--out', target, ...force]);
        expect(r.code, `${command} ${target} ${force}`).toBe(2);
        expect(r.stderr).toMatch(/E_OUTPUT_PROTECTED|is never replaced/);
      }
    }
    expect(sha(ledger)).toBe(before.ledger);
    expect(sha(photo)).toBe(before.photo);
    expect(runCli(['report', ledger, '--format', 'json']).code).toBe(0); // the ledger still opens
  });

  it('refuses another SQLite file, and an earlier export without --force; replaces it with --force', () => {
    const other = path.join(dir, 'other.sqlite');
    cpSync(ledger, other);
    expect(runCli(['export', ledger, '--format', 'csv', '--out', other, '--force']).code).toBe(2);
    const out = path.join(dir, 'media.csv');
    expect(runCli(['export', ledger, '--format', 'csv', '--out', out]).code).toBe(0);
    writeFileSync(out, 'kept by hand\n');
    const again = runCli(['export', ledger, '--format', 'csv', '--out', out]);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/already exists; give --force/);
    expect(readFileSync(out, 'utf8')).toBe('kept by hand\n');
    expect(runCli(['export', ledger, '--format', 'csv', '--out', out, '--force']).code).toBe(0);
    expect(readFileSync(out, 'utf8')).toMatch(/^media_id|^[a-z_]+,/);
    expect(existsSync(`${out}.part`)).toBe(false);
  });

  it('the app export (the request handler the app and browser mode share) answers 409 for the ledger and a photo, and needs force for an earlier export', async () => {
    const h = createHandler({ ledger });
    const post = (body: unknown) => h.handle(new Request('http://127.0.0.1/api/export', { method: 'POST', body: JSON.stringify(body), headers: { 'content-type': 'application/json' } }));
    for (const out of [ledger, photo]) {
      const r = await post({ format: 'csv', out, force: true });
      expect(r.status).toBe(409);
      expect((await r.json()).code).toBe('E_OUTPUT_PROTECTED');
    }
    const out = path.join(dir, 'app.csv');
    expect((await post({ format: 'csv', out })).status).toBe(200);
    const twice = await post({ format: 'csv', out });
    expect(twice.status).toBe(409);
    expect((await twice.json()).code).toBe('E_OUTPUT_EXISTS');
    expect((await post({ format: 'csv', out, force: true })).status).toBe(200);
    expect((await post({ format: 'camtrap-dp', out: ledger })).status).toBe(409); // a package folder where the ledger is
  });
});
