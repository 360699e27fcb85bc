/**
 * A cluster scan in small, with the real command line: a plan of whole deployments, each shard
 * scanned on its own (the shard index from the scheduler's variable), the shards merged. The
 * merged ledger reports exactly what one scan of the same folders reports, and the merge's edge
 * cases: the same shard twice, shards of another plan, a shard missing, decisions made on a
 * shard, a shard scanned again into a merged ledger that already has reviews, the lock.
 */
import { cpSync, existsSync, readdirSync, readFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import Database from 'better-sqlite3';
import { beforeAll, describe, expect, it } from 'vitest';
import { BIN, ROOT, runCli, tempDir } from '../helpers/cli.js';
import { acquireLedgerLock } from '../../src/ledger/ledger-lock.js';
import type { ShardPlan } from '../../src/pipeline/shard-plan.js';

const dir = tempDir('movesift-shards-');
const cards = path.join(dir, 'cards');
const planFile = path.join(dir, 'plan.json');
const shard = (k: number): string => path.join(dir, 'shards', `${k}.ledger`);
let plan: ShardPlan;

function scanShard(k: number, env: Record<string, string> = {}, args = ['--shard', String(k)]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [BIN, 'scan', '--plan', planFile, ...args, '--ledger', shard(k), '--scratch', path.join(dir, 'scratch')], { cwd: ROOT, encoding: 'utf8', env: { ...process.env, ...env } });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

beforeAll(() => {
  cpSync(path.join(ROOT, 'sample-media'), cards, { recursive: true });
  const r = runCli(['shard', 'plan', cards, '--shards', '3', '--out', planFile]);
  expect(r.code, r.stderr).toBe(0);
  plan = JSON.parse(readFileSync(planFile, 'utf8')) as ShardPlan;
  // Shard 1 from a Slurm array task's variable, the others by flag.
  expect(scanShard(1, { SLURM_ARRAY_TASK_ID: '1' }, []).code).toBe(0);
  for (const k of [0, 2]) expect(scanShard(k).code).toBe(0);
}, 300_000);

const report = (ledger: string): unknown => JSON.parse(runCli(['report', ledger]).stdout);

describe('a plan of shards', () => {
  it('holds every deployment once, whole, balanced by work, with the scan options', () => {
    const ids = plan.shards.flatMap((s) => s.deployments.map((d) => d.id)).sort();
    expect(ids).toEqual(['creek-bend', 'reef-station', 'ridge-trail']);
    expect(plan.shards.map((s) => s.deployments.length)).toEqual([1, 1, 1]);
    const reef = plan.shards.flatMap((s) => s.deployments).find((d) => d.id === 'reef-station')!;
    expect(reef.clips).toBe(1);
    expect(reef.clipSeconds).toBeGreaterThan(10); // read with ffprobe
    expect(plan.options).toMatchObject({ deploymentCut: false, flow: false });
  });
  it('refuses screening options beside --plan, a shard out of range, and no shard at all', () => {
    expect(runCli(['scan', '--plan', planFile, '--shard', '0', '--ledger', path.join(dir, 'x.ledger'), '--flow']).stderr).toMatch(/the plan fixes the screening options/);
    expect(runCli(['scan', '--plan', planFile, '--shard', '3', '--ledger', path.join(dir, 'x.ledger')]).stderr).toMatch(/shards 0-2/);
    const none = spawnSync(process.execPath, [BIN, 'scan', '--plan', planFile, '--ledger', path.join(dir, 'x.ledger')], { cwd: ROOT, encoding: 'utf8', env: { ...process.env, SLURM_ARRAY_TASK_ID: '', JOB_COMPLETION_INDEX: '' } });
    expect(none.status).toBe(2);
    expect(none.stderr).toMatch(/which shard/);
  });
});

describe('merging shards', () => {
  it('gives the report one scan of the same folders gives, with every preview', () => {
    const one = path.join(dir, 'one.ledger');
    expect(runCli(['scan', cards, '--ledger', one]).code).toBe(0);
    const merged = path.join(dir, 'merged.ledger');
    const r = runCli(['merge', shard(0), shard(1), shard(2), '--ledger', merged]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('All 3 shard(s) of the plan are in');
    expect(report(merged)).toEqual(report(one));
    const db = new Database(merged, { readonly: true });
    const paths = db.prepare<[], { path: string }>('SELECT path FROM previews').all();
    db.close();
    expect(paths.length).toBeGreaterThan(30);
    for (const p of paths) expect(existsSync(path.join(`${merged}.previews`, p.path)), p.path).toBe(true);
    // The same shard again changes nothing.
    const again = runCli(['merge', shard(1), '--ledger', merged]);
    expect(again.stdout).toMatch(/0 shard\(s\) merged, 0 replaced by a newer scan, 1 already merged and unchanged \(1\)/);
    expect(report(merged)).toEqual(report(one));
  });

  it('names a missing shard, and refuses shards of another plan, a ledger that is not a shard, a shard given twice', () => {
    const partial = path.join(dir, 'partial.ledger');
    const r = runCli(['merge', shard(0), shard(2), '--ledger', partial]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('Still missing: shard(s) 1 of 3');
    const otherPlan = path.join(dir, 'other-plan.json');
    expect(runCli(['shard', 'plan', cards, '--shards', '2', '--out', otherPlan]).code).toBe(0);
    const other = path.join(dir, 'other.ledger');
    expect(runCli(['scan', '--plan', otherPlan, '--shard', '0', '--ledger', other]).code).toBe(0);
    const mixed = runCli(['merge', shard(0), other, '--ledger', path.join(dir, 'mixed.ledger')]);
    expect(mixed.code).toBe(2);
    expect(mixed.stderr).toMatch(/is a shard of plan [0-9a-f]+, the others of plan/);
    const into = runCli(['merge', other, '--ledger', partial]);
    expect(into.code).toBe(2);
    expect(into.stderr).toMatch(/holds shards of plan/);
    expect(existsSync(path.join(dir, 'mixed.ledger'))).toBe(false); // refused before anything was written
    const plain = path.join(dir, 'plain.ledger');
    expect(runCli(['scan', path.join(cards, 'ridge-trail'), '--ledger', plain]).code).toBe(0);
    expect(runCli(['merge', plain, '--ledger', path.join(dir, 'm2.ledger')]).stderr).toMatch(/is not a shard ledger/);
    expect(runCli(['merge', shard(0), shard(0), '--ledger', path.join(dir, 'm3.ledger')]).stderr).toMatch(/given twice/);
  });

  it('keeps decisions made on a shard with their origin, and a rescanned shard replaces its rows, not the reviews', () => {
    const merged = path.join(dir, 'reviewed.ledger');
    expect(runCli(['merge', shard(0), shard(1), shard(2), '--ledger', merged]).code).toBe(0);
    const dep = plan.shards[2].deployments[0].id;
    // A review on the merged ledger, then a decision made on shard 2 afterwards.
    expect(runCli(['decide', merged, '--keep', '--deployment', dep]).code).toBe(0);
    const onShard = runCli(['decide', shard(2), '--set-aside', '--deployment', dep]);
    expect(onShard.code, onShard.stderr).toBe(0);
    expect(onShard.stdout).toMatch(/[1-9]\d* event/);
    const r = runCli(['merge', shard(2), '--ledger', merged]);
    expect(r.stdout).toMatch(/1 replaced by a newer scan \(2\)/);
    const db = new Database(merged, { readonly: true });
    const rows = db.prepare<[], { origin: string | null; decision: string; n: number }>('SELECT origin, decision, count(*) AS n FROM decisions GROUP BY origin, decision ORDER BY origin').all();
    const events = (db.prepare('SELECT count(*) AS n FROM events').get() as { n: number }).n;
    db.close();
    expect(rows.find((x) => x.origin === null)).toMatchObject({ decision: 'keep' });
    expect(rows.find((x) => x.origin === `shard 2 of plan ${plan.id}`)).toMatchObject({ decision: 'set-aside' });
    expect(events).toBe((report(shard(0)) as { events: unknown[] }).events.length + (report(shard(1)) as { events: unknown[] }).events.length + (report(shard(2)) as { events: unknown[] }).events.length);
    // Merged again: the shard's decisions are not taken twice.
    expect(runCli(['merge', shard(2), '--ledger', merged]).stdout).toMatch(/already merged and unchanged/);
  });

  it('is refused while another process holds the merged ledger, and refuses a shard with a label calibration', () => {
    const merged = path.join(dir, 'busy.ledger');
    expect(runCli(['merge', shard(0), '--ledger', merged]).code).toBe(0);
    const held = acquireLedgerLock(merged, 'scan');
    const r = runCli(['merge', shard(1), '--ledger', merged]);
    held.release();
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/in use by scan/);
    const calibrated = path.join(dir, 'shards', 'calibrated.ledger');
    cpSync(shard(1), calibrated);
    const db = new Database(calibrated);
    db.prepare("INSERT INTO calibrations (at, target_recall, threshold, animals, recall_lower, applied, changed) VALUES ('2026-12-05T10:00:00Z', 0.99, 0.4, 300, 0.99, 1, 1)").run();
    db.close();
    expect(runCli(['merge', calibrated, '--ledger', path.join(dir, 'm4.ledger')]).stderr).toMatch(/Calibrate on the merged ledger instead/);
    expect(readdirSync(path.join(dir, 'scratch'))).toEqual([]); // every shard published, nothing left on scratch
  });

  it('brings an apply made on a shard with its journal and an audit with its sample, so undo on the merged ledger puts the files back', () => {
    const applied = path.join(dir, 'shards', 'applied.ledger');
    cpSync(shard(0), applied);
    const dep = plan.shards[0].deployments[0];
    expect(runCli(['decide', applied, '--set-aside', '--deployment', dep.id]).code).toBe(0);
    const aside = path.join(tempDir('movesift-shard-aside-'), 'aside');
    const before = readdirSync(path.join(cards, dep.folders[0])).length;
    const a = runCli(['apply', applied, '--to', aside]);
    expect(a.code, a.stderr).toBe(0);
    expect(readdirSync(path.join(cards, dep.folders[0])).length).toBeLessThan(before);
    expect(runCli(['audit', applied, '--sample', '3']).code).toBe(0);
    const merged = path.join(dir, 'with-apply.ledger');
    expect(runCli(['merge', applied, shard(1), shard(2), '--ledger', merged]).code).toBe(0);
    const db = new Database(merged, { readonly: true });
    const applies = db.prepare<[], { origin: string; status: string }>('SELECT origin, status FROM applies').all();
    const moved = (db.prepare("SELECT count(*) AS n FROM moves WHERE state = 'moved'").get() as { n: number }).n;
    const audits = db.prepare<[], { origin: string; items: number }>('SELECT a.origin, (SELECT count(*) FROM audit_items i WHERE i.audit_id = a.id) AS items FROM audits a').all();
    db.close();
    expect(audits).toEqual([{ origin: `shard 0 of plan ${plan.id}`, items: 3 }]);
    expect(applies).toEqual([{ origin: `shard 0 of plan ${plan.id}`, status: 'done' }]);
    expect(moved).toBe(before - 0 - readdirSync(path.join(cards, dep.folders[0])).length);
    const u = runCli(['undo', merged]);
    expect(u.code, u.stderr).toBe(0);
    expect(readdirSync(path.join(cards, dep.folders[0])).length).toBe(before);
  });
});
