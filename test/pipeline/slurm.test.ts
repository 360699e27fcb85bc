/**
 * The cluster scan on a real Slurm (test/helpers/slurm.ts): `movesift slurm submit --wait` runs
 * the sample media as a 3-task job array and the merge after it; the merged ledger reports what
 * one machine's scan of the same folders reports. Skipped, saying why, only where Slurm's
 * packages are not installed.
 */
import { cpSync, existsSync, readFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BIN, ROOT, runCli, tempDir } from '../helpers/cli.js';
import { slurmMissing, startSlurm, type LocalSlurm } from '../helpers/slurm.js';

const why = slurmMissing();
if (why) console.log(`slurm test skipped: ${why}`);

describe.skipIf(why !== undefined)('a scan on a Slurm job array', () => {
  let slurm: LocalSlurm;
  beforeAll(async () => {
    slurm = await startSlurm();
  }, 60_000);
  afterAll(async () => {
    await slurm?.stop();
  });

  it('submits the shards and the merge, waits, and merges what one machine would have scanned', () => {
    const dir = tempDir('movesift-cluster-');
    const cards = path.join(dir, 'cards');
    cpSync(path.join(ROOT, 'sample-media'), cards, { recursive: true });
    const merged = path.join(dir, 'grid.ledger');
    const dry = spawnSync(process.execPath, [BIN, 'slurm', 'submit', cards, '--ledger', merged, '--shards', '3', '--dry-run', '--sbatch-arg=--time=00:10:00'], { cwd: ROOT, env: slurm.env, encoding: 'utf8' });
    expect(dry.status, dry.stderr).toBe(0);
    expect(dry.stdout).toContain('#SBATCH --array=0-2');
    expect(dry.stdout).toContain('#SBATCH --time=00:10:00');
    expect(existsSync(`${merged}.cluster`)).toBe(false); // a dry run writes nothing
    const r = spawnSync(process.execPath, [BIN, 'slurm', 'submit', cards, '--ledger', merged, '--shards', '3', '--wait'], { cwd: ROOT, env: slurm.env, encoding: 'utf8', timeout: 300_000 });
    expect(r.status, `${r.stdout}\n${r.stderr}`).toBe(0);
    expect(r.stdout).toMatch(/Submitted the scan as job array \d+ \(3 task\(s\)\) and the merge as job \d+/);
    expect(r.stdout).toContain('Done: every shard is merged');
    for (const k of [0, 1, 2]) expect(readFileSync(path.join(`${merged}.cluster`, 'logs', `shard-${k}.out`), 'utf8')).toContain(`Shard ${k} of plan`);
    const one = path.join(dir, 'one.ledger');
    expect(runCli(['scan', cards, '--ledger', one]).code).toBe(0);
    expect(JSON.parse(runCli(['report', merged]).stdout)).toEqual(JSON.parse(runCli(['report', one]).stdout));
  }, 360_000);
});
