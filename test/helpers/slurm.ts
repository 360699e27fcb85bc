/**
 * A real Slurm on this machine for the cluster tests: munged, slurmctld and slurmd started
 * directly (no systemd here) on 127.0.0.1 with a generated slurm.conf in a temporary folder, on
 * free ports, one node with this machine's cores; stopped by their pids. Debian's packages
 * (slurmctld, slurmd, slurm-client, munge; .ci/run installs them).
 */
import { execFileSync, spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { tempDir } from './cli.js';

export interface LocalSlurm {
  /** Environment for sbatch, squeue and movesift: SLURM_CONF pointing at this cluster. */
  env: NodeJS.ProcessEnv;
  dir: string;
  stop(): Promise<void>;
}

const which = (cmd: string): boolean => spawnSync('sh', ['-c', `command -v ${cmd}`]).status === 0;

/** Why a local Slurm cannot run here, or undefined when it can. */
export function slurmMissing(): string | undefined {
  const missing = ['munged', 'slurmctld', 'slurmd', 'sbatch', 'squeue'].filter((c) => !which(c));
  if (missing.length) return `Slurm is not installed (${missing.join(', ')} missing; apt-get install slurmctld slurmd slurm-client munge)`;
  if (!existsSync('/etc/munge/munge.key')) return 'munge has no key (/etc/munge/munge.key)';
  if (process.getuid?.() !== 0) return 'the local Slurm runs its daemons as root';
  return undefined;
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
    s.on('error', reject);
  });
}

export async function startSlurm(): Promise<LocalSlurm> {
  const dir = tempDir('movesift-slurm-');
  for (const d of ['state', 'spool', 'log', 'run']) mkdirSync(path.join(dir, d));
  const host = os.hostname();
  const [ctld, d] = [await freePort(), await freePort()];
  const conf = path.join(dir, 'slurm.conf');
  writeFileSync(conf, [
    'ClusterName=movesifttest', `SlurmctldHost=${host}(127.0.0.1)`, 'SlurmUser=root', 'SlurmdUser=root',
    'AuthType=auth/munge', 'CredType=cred/munge', `AuthInfo=socket=${dir}/run/munge.sock`,
    `StateSaveLocation=${dir}/state`, `SlurmdSpoolDir=${dir}/spool`, `SlurmctldPidFile=${dir}/run/slurmctld.pid`, `SlurmdPidFile=${dir}/run/slurmd.pid`,
    `SlurmctldPort=${ctld}`, `SlurmdPort=${d}`, `SlurmctldLogFile=${dir}/log/slurmctld.log`, `SlurmdLogFile=${dir}/log/slurmd.log`,
    'ProctrackType=proctrack/linuxproc', 'TaskPlugin=task/none', 'SchedulerType=sched/builtin', 'SelectType=select/cons_tres', 'SelectTypeParameters=CR_CPU',
    'ReturnToService=2', 'MpiDefault=none', 'JobCompType=jobcomp/none', 'AccountingStorageType=accounting_storage/none', 'JobAcctGatherType=jobacct_gather/none',
    `NodeName=${host} NodeAddr=127.0.0.1 CPUs=${os.availableParallelism()} State=UNKNOWN`,
    `PartitionName=debug Nodes=${host} Default=YES MaxTime=INFINITE State=UP`, '',
  ].join('\n'));
  execFileSync('munged', ['--force', `--socket=${dir}/run/munge.sock`, `--pid-file=${dir}/run/munged.pid`, `--log-file=${dir}/log/munged.log`, `--seed-file=${dir}/run/munge.seed`]);
  const env = { ...process.env, SLURM_CONF: conf };
  const daemons: ChildProcess[] = [
    spawn('slurmctld', ['-D', '-f', conf], { env, stdio: 'ignore' }),
    spawn('slurmd', ['-D', '-f', conf, '-N', host], { env, stdio: 'ignore' }),
  ];
  const stop = async (): Promise<void> => {
    for (const p of daemons) p.kill('SIGTERM');
    await Promise.all(daemons.map((p) => (p.exitCode !== null ? undefined : new Promise((r) => p.once('exit', r)))));
    try {
      process.kill(Number(readFileSync(`${dir}/run/munged.pid`, 'utf8')), 'SIGTERM');
    } catch {
      /* already gone */
    }
  };
  // Ready when the node reports idle.
  for (let t = 0; t < 100; t++) {
    const r = spawnSync('sinfo', ['-h', '-o', '%t'], { env, encoding: 'utf8' });
    if (r.status === 0 && r.stdout.trim() === 'idle') return { env, dir, stop };
    await new Promise((res) => setTimeout(res, 200));
  }
  await stop();
  throw new Error(`the local Slurm did not come up: ${readFileSync(`${dir}/log/slurmctld.log`, 'utf8').slice(-800)}`);
}
