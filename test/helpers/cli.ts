/** Runs the real `movesift` command line in a child process, as a user would. */
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';

export const ROOT = path.resolve(import.meta.dirname, '../..');
export const BIN = path.join(ROOT, 'bin/movesift.mjs');

export function runCli(args: string[], cwd = ROOT): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', maxBuffer: 64 << 20 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

export function startCli(args: string[]) {
  return spawn(process.execPath, [BIN, ...args], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
}

export function tempDir(prefix = 'movesift-'): string {
  return mkdtempSync(path.join(os.tmpdir(), prefix));
}
