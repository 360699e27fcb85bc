/**
 * Splitting a large scan into shards for a cluster: whole deployments only (a deployment's
 * triggers are each other's background, its data strip and its own calibration are computed
 * over all of them, so a deployment split across shards would screen differently from one
 * scan), balanced by the work they hold. The plan records the scan options, so every shard
 * screens as every other and as one machine would; `movesift merge` refuses shards of another
 * plan.
 *
 * Work per deployment: images count one each; a clip counts its duration times
 * CLIP_SECOND_IN_IMAGES (ffprobe at planning time). Shards are filled largest deployment first
 * into the lightest shard (longest-processing-time-first, which is within 4/3 of the best
 * balance: Graham, "Bounds on multiprocessing timing anomalies", SIAM J. Appl. Math. 1969).
 */
import { createHash } from 'node:crypto';
import path from 'node:path';
import { findMedia, type FoundFile } from '../media/find-media.js';
import { probeVideo } from '../media/probe-video.js';
import { ENGINE_VERSION } from './engine-version.js';
import { deploymentIdOf, readDeploymentsTable, type DeploymentFacts } from './deployments-table.js';
import type { ScanOptions } from './scan.js';
import { pipelineError, PipelineErrorCode } from './pipeline-errors.js';

/** Seconds of clip that cost about one image's screening, from the speeds `npm run bench:scan`
 *  measures (a 720p clip and 5-MP photos on one thread; README, Screening a deployment). Change
 *  it with those figures. */
export const CLIP_SECOND_IN_IMAGES = 1;

/** The screening options a plan fixes for every shard (as `movesift scan` takes them). */
export type ShardScanOptions = Pick<ScanOptions, 'analysisWidth' | 'videoFps' | 'eventGapS' | 'flow' | 'classifier' | 'deploymentCut' | 'deploymentsTable'>;

export interface PlannedDeployment {
  root: string;
  id: string;
  /** Folders below the root whose media belong to it ('' for the root itself). */
  folders: string[];
  images: number;
  clips: number;
  clipSeconds: number;
  work: number;
}

export interface ShardPlan {
  schema: 'movesift.shard-plan/1';
  /** Names the plan: a hash of its roots, options, engine and assignment. */
  id: string;
  created: string;
  engineVersion: string;
  roots: string[];
  options: ShardScanOptions;
  shards: Array<{ index: number; work: number; deployments: PlannedDeployment[] }>;
}

export async function planShards(roots: readonly string[], shardCount: number, options: ShardScanOptions = {}): Promise<ShardPlan> {
  if (!Number.isInteger(shardCount) || shardCount < 1 || shardCount > 100_000) throw pipelineError(PipelineErrorCode.invalidPlan, `--shards: wanted a whole number 1-100000, got ${shardCount}`);
  const table = options.deploymentsTable ? readDeploymentsTable(options.deploymentsTable) : new Map<string, DeploymentFacts>();
  const absRoots = roots.map((r) => path.resolve(r));
  const deployments: PlannedDeployment[] = [];
  for (const root of absRoots) {
    const { files } = await findMedia(root);
    const byId = new Map<string, FoundFile[]>();
    for (const f of files) {
      const id = deploymentIdOf(table, root, f.folder);
      const list = byId.get(id);
      if (list) list.push(f);
      else byId.set(id, [f]);
    }
    for (const [id, list] of byId) {
      let clipSeconds = 0;
      for (const f of list) {
        if (f.kind !== 'video') continue;
        // A clip that cannot be probed still costs its decode attempt: count it as a minute.
        clipSeconds += await probeVideo(f.abs, f.rel).then((v) => v.durationS ?? 60, () => 60);
      }
      const images = list.filter((f) => f.kind === 'image').length;
      deployments.push({ root, id, folders: [...new Set(list.map((f) => f.folder))].sort(), images, clips: list.length - images, clipSeconds: Math.round(clipSeconds * 10) / 10, work: images + clipSeconds * CLIP_SECOND_IN_IMAGES });
    }
  }
  const shards = Array.from({ length: shardCount }, (_, index) => ({ index, work: 0, deployments: [] as PlannedDeployment[] }));
  // Largest first; ties by root and id, so the same folders always give the same plan.
  const order = [...deployments].sort((a, b) => b.work - a.work || a.root.localeCompare(b.root) || a.id.localeCompare(b.id));
  for (const d of order) {
    const lightest = shards.reduce((m, s) => (s.work < m.work ? s : m));
    lightest.deployments.push(d);
    lightest.work += d.work;
  }
  for (const s of shards) s.work = Math.round(s.work * 10) / 10;
  const body = { engineVersion: ENGINE_VERSION, roots: absRoots, options, shards };
  const id = createHash('sha256').update(JSON.stringify(body)).digest('hex').slice(0, 16);
  return { schema: 'movesift.shard-plan/1', id, created: new Date().toISOString(), ...body };
}

/** Reads and checks a plan written by planShards. */
export function parsePlan(text: string, file: string): ShardPlan {
  let p: ShardPlan;
  try {
    p = JSON.parse(text) as ShardPlan;
  } catch {
    throw pipelineError(PipelineErrorCode.invalidPlan, `${file}: not a shard plan (not JSON); make one with \`movesift shard plan\``);
  }
  if (p?.schema !== 'movesift.shard-plan/1' || !Array.isArray(p.shards) || !Array.isArray(p.roots) || typeof p.id !== 'string') {
    throw pipelineError(PipelineErrorCode.invalidPlan, `${file}: not a shard plan of this Movesift (schema ${JSON.stringify(p?.schema)}); make one with \`movesift shard plan\``);
  }
  return p;
}

/** The shard to run: the one given, else the scheduler's task index (a Slurm job array's
 *  SLURM_ARRAY_TASK_ID, or a Kubernetes indexed job's JOB_COMPLETION_INDEX). */
export function shardIndex(plan: ShardPlan, given: number | undefined, env: NodeJS.ProcessEnv = process.env): number {
  const raw = given ?? env.SLURM_ARRAY_TASK_ID ?? env.JOB_COMPLETION_INDEX;
  const k = Number(raw);
  if (raw === undefined || raw === '') throw pipelineError(PipelineErrorCode.invalidPlan, 'which shard? give --shard K, or run as a job array task (SLURM_ARRAY_TASK_ID or JOB_COMPLETION_INDEX set)');
  if (!Number.isInteger(k) || k < 0 || k >= plan.shards.length) throw pipelineError(PipelineErrorCode.invalidPlan, `shard ${raw}: the plan has shards 0-${plan.shards.length - 1}`);
  return k;
}
