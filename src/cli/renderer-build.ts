/**
 * Finds the built review renderer, building it with Vite first when this is a source checkout
 * that has not been built yet (a packaged app ships it built).
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { MovesiftError } from '../shared/errors.js';

export const PACKAGE_ROOT = path.resolve(import.meta.dirname, '../..');
export const RENDERER_DIR = path.join(PACKAGE_ROOT, 'dist/renderer');

export function ensureRenderer(log: (s: string) => void): string {
  if (existsSync(path.join(RENDERER_DIR, 'index.html'))) return RENDERER_DIR;
  const vite = path.join(PACKAGE_ROOT, 'node_modules/vite/bin/vite.js');
  if (!existsSync(vite)) throw new MovesiftError('E_RENDERER_MISSING', `the review app is not built (${RENDERER_DIR} is missing) and Vite is not installed to build it; run \`npm ci && npm run build\``);
  log('Building the review app once (npm run build)...');
  const r = spawnSync(process.execPath, [vite, 'build', '--logLevel', 'warn'], { cwd: PACKAGE_ROOT, stdio: ['ignore', 'inherit', 'inherit'] });
  if (r.status !== 0 || !existsSync(path.join(RENDERER_DIR, 'index.html'))) throw new MovesiftError('E_RENDERER_MISSING', 'building the review app failed; run `npm run build` to see why');
  return RENDERER_DIR;
}
