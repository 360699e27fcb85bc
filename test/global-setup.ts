/**
 * Runs once before the suite: builds the review renderer fresh, so the browser tests (which run
 * in parallel files) all serve the same, current build and none rebuilds it under another; and
 * resolves the browser once, so the packaged Chromium (when that is the one used) is unpacked
 * by one process, not raced by two.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { chromiumPath } from './helpers/browser.js';

export default async function setup(): Promise<void> {
  const root = path.resolve(import.meta.dirname, '..');
  const r = spawnSync(process.execPath, [path.join(root, 'node_modules/vite/bin/vite.js'), 'build', '--logLevel', 'warn'], { cwd: root, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`vite build failed:\n${r.stdout}\n${r.stderr}`);
  const browser = await chromiumPath();
  process.env.MOVESIFT_CHROMIUM = browser.path;
  console.log(`browser tests use ${browser.source} (${browser.path})`);
}
