/**
 * `npm run demo` ends with the exact command that opens its result, and that result is a ledger
 * holding the sample media's events (so `npm start -- <it>` opens a full grid, not an empty
 * start screen).
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { expect, it } from 'vitest';
import { buildReport } from '../../src/pipeline/report.js';
import { ROOT, tempDir } from '../helpers/cli.js';

it('prints the command that opens its ledger, and the ledger holds the sample events', () => {
  const ledger = path.join(tempDir('movesift-demo-test-'), 'demo.ledger');
  const r = spawnSync(process.execPath, [path.join(ROOT, 'node_modules/tsx/dist/cli.mjs'), path.join(ROOT, 'tools/demo.ts'), '--ledger', ledger], { cwd: ROOT, encoding: 'utf8' });
  expect(r.status, r.stderr).toBe(0);
  const shown = path.relative(ROOT, ledger);
  expect(r.stdout).toContain(`The result is in ${shown}.`);
  expect(r.stdout).toContain(`\n  npm start -- ${shown}\n`);
  expect(buildReport(ledger).events).toHaveLength(25);
}, 120_000);
