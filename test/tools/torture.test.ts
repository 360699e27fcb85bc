/**
 * A small slice of `npm run torture` in every test run: a few kill points over scan, apply and
 * undo, a fuzzed card of 40 entries, the concurrency cases and a second of load. The full run
 * (200 kill points, 500 entries) is in the robustness issue's note and the README.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers/cli.js';

describe('the torture run, in small', () => {
  it('recovers every kill point, accounts for every fuzzed entry, refuses the second writer, serves the load without error', () => {
    const r = spawnSync(process.execPath, [path.join(ROOT, 'node_modules/tsx/dist/cli.mjs'), 'tools/torture.ts', '--kills', '5', '--fuzz', '40', '--load-seconds', '1', '--clients', '4', '--seed', '7', '--small', '--json'], { cwd: ROOT, encoding: 'utf8', maxBuffer: 64 << 20 });
    expect(r.status, r.stderr.slice(-2000)).toBe(0);
    const out = JSON.parse(r.stdout.trim().split('\n').pop()!) as {
      kills: Record<string, { points: number; recovered: number }>;
      fuzz: { entries: number; unaccounted: number; peakMB: number; kinds: Record<string, number> };
      concurrency: Record<string, string>;
      load: { requests: number; errors: number };
      failures: string[];
    };
    expect(out.failures).toEqual([]);
    for (const [k, v] of Object.entries(out.kills)) expect(v.recovered, k).toBe(v.points);
    expect(Object.keys(out.kills)).toEqual(expect.arrayContaining(['scan', 'apply, same disk', 'undo, same disk']));
    expect(out.fuzz.entries).toBeGreaterThanOrEqual(40);
    expect(Object.keys(out.fuzz.kinds).length).toBeGreaterThanOrEqual(18); // one of every kind first
    expect(out.fuzz.unaccounted).toBe(0);
    expect(Object.values(out.concurrency).every((v) => v !== 'FAILED')).toBe(true);
    expect(out.load.requests).toBeGreaterThan(0);
    expect(out.load.errors).toBe(0);
  }, 600_000);
});
