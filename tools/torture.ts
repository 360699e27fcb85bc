/**
 * The proof that nothing is lost, repeatable: `npm run torture` (not part of `npm test`, which
 * runs a small slice of it: test/tools/torture.test.ts).
 *
 * 1. Kill matrix: scan, apply and undo killed with SIGKILL at seeded moments across their run
 *    (apply and undo both into a folder on the same disk and on another one, /dev/shm), then
 *    run again. Every kill point must recover: `PRAGMA integrity_check` ok, nothing left half
 *    done in the journal, the report equal to an uninterrupted scan's, and every original
 *    present exactly once, with its SHA-256, before and after undo.
 * 2. Fuzz: a card of hostile entries from a fixed seed (tools/torture/fuzz-card.ts) scanned once:
 *    every entry accounted for exactly once (screened, an error, or passed over with a reason),
 *    the scan's peak memory under the limit.
 * 3. Concurrency: two applies at once into different folders, a dry run during an apply, two
 *    scans at once: the second writer is refused, nothing is left untracked.
 * 4. Load: the review server under concurrent clients for a bounded time (reads and decisions),
 *    no error; then hostile requests (a foreign origin, a body far past the limit) refused
 *    without the server's memory growing with the body.
 *
 *   npm run torture -- [--kills 200] [--fuzz 500] [--seed 1] [--load-seconds 10] [--clients 20] [--json]
 *
 * Prints the counts of each part and exits 1 when any check failed.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import { cpSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { request } from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import Database from 'better-sqlite3';
import { mulberry32 } from '../src/shared/stats/seeded-random.js';
import { writeFuzzCard, type FuzzEntry } from './torture/fuzz-card.js';

const ROOT = path.resolve(import.meta.dirname, '..');
const BIN = path.join(ROOT, 'bin/movesift.mjs');
const SAMPLE = path.join(ROOT, 'sample-media');
/** The fuzz scan's peak memory limit (the robustness issue's acceptance). */
const MEMORY_LIMIT_MB = 600;

const { values: opt } = parseArgs({
  options: {
    kills: { type: 'string', default: '200' },
    fuzz: { type: 'string', default: '500' },
    seed: { type: 'string', default: '1' },
    'load-seconds': { type: 'string', default: '10' },
    clients: { type: 'string', default: '20' },
    json: { type: 'boolean', default: false },
    small: { type: 'boolean', default: false },
  },
});
/** --small (the test suite's slice): the day camera and the reef clip for the scan, two cameras
 *  for apply and undo, so the fixed cost of the baselines stays small. */
const SMALL = opt.small;
const KILLS = Number(opt.kills), FUZZ = Number(opt.fuzz), SEED = Number(opt.seed), LOAD_S = Number(opt['load-seconds']), CLIENTS = Number(opt.clients);
const rnd = mulberry32(SEED);
const failures: string[] = [];
const say = (s: string): void => void (opt.json ? process.stderr : process.stdout).write(s + '\n');
const check = (ok: boolean, what: string): boolean => {
  if (!ok) {
    failures.push(what);
    say(`  FAILED: ${what}`);
  }
  return ok;
};

// ---------------------------------------------------------------- helpers

function run(args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: ROOT, encoding: 'utf8', maxBuffer: 256 << 20 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}
const start = (args: string[]): ChildProcess => spawn(process.execPath, [BIN, ...args], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
const exited = (c: ChildProcess): Promise<void> => (c.exitCode !== null || c.signalCode !== null ? Promise.resolve() : new Promise((r) => c.once('exit', () => r())));
const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));
const sha = (f: string): string => createHash('sha256').update(readFileSync(f)).digest('hex');

/** Every regular file under `dir`, relative, with its SHA-256. */
function hashes(dir: string): Map<string, string> {
  const out = new Map<string, string>();
  const walk = (d: string): void => {
    if (!existsSync(d)) return;
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.isFile()) out.set(path.relative(dir, p), sha(p));
    }
  };
  walk(dir);
  return out;
}

function removeLedger(ledger: string): void {
  for (const f of [ledger, `${ledger}-wal`, `${ledger}-shm`, `${ledger}-journal`, `${ledger}.lock`, `${ledger}.previews`]) rmSync(f, { recursive: true, force: true });
}

function ledgerState(ledger: string): { integrity: string; pending: number; failed: number } {
  const db = new Database(ledger, { readonly: true });
  try {
    const integrity = (db.pragma('integrity_check', { simple: true }) as string) ?? '';
    const has = db.prepare("SELECT count(*) AS n FROM sqlite_master WHERE name = 'moves'").get() as { n: number };
    const pending = has.n ? (db.prepare("SELECT count(*) AS n FROM moves WHERE state IN ('planned', 'moving', 'restoring')").get() as { n: number }).n : 0;
    const failed = has.n ? (db.prepare("SELECT count(*) AS n FROM moves WHERE state = 'failed'").get() as { n: number }).n : 0;
    return { integrity, pending, failed };
  } finally {
    db.close();
  }
}

/** Times a command run to its end (ms). */
function timed(args: string[]): number {
  const t0 = performance.now();
  const r = run(args);
  if (r.code !== 0) throw new Error(`${args[0]} failed while measuring: ${r.stderr}`);
  return performance.now() - t0;
}

/** Starts `args`, kills it with SIGKILL after `ms`; says whether it had already finished. */
async function killAfter(args: string[], ms: number): Promise<'killed' | 'finished'> {
  const c = start(args);
  c.stdout!.resume();
  c.stderr!.resume();
  await Promise.race([sleep(ms), exited(c)]);
  if (c.exitCode !== null) return 'finished';
  c.kill('SIGKILL');
  await exited(c);
  return 'killed';
}

/** A folder on another file system than `near` when there is one (/dev/shm), for moves that copy. */
function otherDisk(near: string): string | undefined {
  for (const base of ['/dev/shm', os.tmpdir()]) {
    if (existsSync(base) && statSync(base).dev !== statSync(near).dev) return mkdtempSync(path.join(base, 'movesift-torture-'));
  }
  return undefined;
}

// ---------------------------------------------------------------- 1. kill matrix

interface KillTally {
  points: number;
  killed: number;
  finishedFirst: number;
  recovered: number;
}

async function killMatrix(work: string): Promise<Record<string, KillTally>> {
  const tally: Record<string, KillTally> = {};
  const t = (k: string): KillTally => (tally[k] ??= { points: 0, killed: 0, finishedFirst: 0, recovered: 0 });

  // Scan: the whole sample (bursts and a clip), killed and resumed; the report must equal one
  // uninterrupted scan's.
  const scanCard = path.join(work, 'scan-card');
  if (SMALL) for (const d of ['ridge-trail', 'reef-station']) cpSync(path.join(SAMPLE, d), path.join(scanCard, d), { recursive: true, preserveTimestamps: true });
  else {
    cpSync(SAMPLE, scanCard, { recursive: true, preserveTimestamps: true });
    rmSync(path.join(scanCard, 'ground-truth.json'));
  }
  const baseLedger = path.join(work, 'scan-base.ledger');
  const scanMs = timed(['scan', scanCard, '--ledger', baseLedger, '--workers', '2']);
  const baseReport = run(['report', baseLedger]).stdout;
  const scanKills = Math.round(KILLS * 0.4);
  const scanLedger = path.join(work, 'scan-trial.ledger');
  say(`kill matrix: scan of ${hashes(scanCard).size} files (${(scanMs / 1000).toFixed(1)} s uninterrupted), ${scanKills} kill points`);
  for (let k = 0; k < scanKills; k++) {
    const tl = t('scan');
    tl.points++;
    removeLedger(scanLedger);
    const at = 150 + rnd() * scanMs * 0.95;
    const how = await killAfter(['scan', scanCard, '--ledger', scanLedger, '--workers', '2'], at);
    if (how === 'killed') tl.killed++;
    else tl.finishedFirst++;
    const again = run(['scan', scanCard, '--ledger', scanLedger, '--workers', '2']);
    const s = existsSync(scanLedger) ? ledgerState(scanLedger) : { integrity: 'missing', pending: 0, failed: 0 };
    const ok = check(again.code === 0, `scan kill ${k} at ${at.toFixed(0)} ms: rerun exited ${again.code}: ${again.stderr.slice(-300)}`)
      && check(s.integrity === 'ok', `scan kill ${k}: integrity ${s.integrity}`)
      && check(run(['report', scanLedger]).stdout === baseReport, `scan kill ${k} at ${at.toFixed(0)} ms: the report differs from an uninterrupted scan's`);
    if (ok) tl.recovered++;
  }

  // Apply and undo: every file of a 192-file card (64 with --small) set aside, moved into a folder on the same
  // disk (renames) or another (verified copies), killed, run again, undone.
  const pristine = path.join(work, 'pristine');
  const cameras = SMALL ? 2 : 6;
  for (let d = 0; d < cameras; d++) cpSync(path.join(SAMPLE, d < cameras - 2 || d === 0 ? 'ridge-trail' : 'creek-bend'), path.join(pristine, `cam${d}`), { recursive: true, preserveTimestamps: true });
  const card = path.join(work, 'card');
  const ledger = path.join(work, 'apply.ledger');
  const decided = path.join(work, 'apply-decided.ledger');
  cpSync(pristine, card, { recursive: true, preserveTimestamps: true });
  if (run(['scan', card, '--ledger', decided, '--workers', '2']).code !== 0) throw new Error('the apply card could not be scanned');
  for (const v of ['likely-blank', 'unsure', 'motion']) run(['decide', decided, '--set-aside', '--verdict', v]);
  const originals = hashes(pristine);
  const reset = (aside: string): void => {
    rmSync(card, { recursive: true, force: true });
    cpSync(pristine, card, { recursive: true, preserveTimestamps: true });
    rmSync(aside, { recursive: true, force: true });
    removeLedger(ledger);
    cpSync(decided, ledger);
  };
  /** Every original exactly once, whole: at home, or in the set-aside folder. `midway`: right
   *  after a kill, when a copy across disks may be whole in both places (copied and renamed,
   *  not yet removed at its old place) or have left its part file; the next run settles both. */
  const everyOnce = (aside: string, label: string, midway = false): boolean => {
    const home = hashes(card);
    const away = hashes(path.join(aside, path.basename(card)));
    for (const [rel, h] of originals) {
      const places = [home.get(rel), away.get(rel)].filter((x) => x !== undefined);
      if (!check((places.length === 1 || (midway && places.length === 2)) && places.every((p) => p === h), `${label}: ${rel} is in ${places.length} place(s)${places.length === 1 ? ' with another SHA-256' : ''}`)) return false;
    }
    const stray = [...home.keys(), ...away.keys()].filter((r) => !originals.has(r) && !(midway && r.endsWith('.movesift-part')));
    return check(stray.length === 0, `${label}: files nobody put there: ${stray.slice(0, 3).join(', ')}`);
  };
  const allHome = (label: string): boolean => {
    const home = hashes(card);
    return check(home.size === originals.size && [...originals].every(([r, h]) => home.get(r) === h), `${label}: not every original is back home, whole`);
  };
  const disks: Array<[string, string]> = [['same disk', path.join(work, 'aside')]];
  const other = otherDisk(work);
  if (other) disks.push(['another disk', path.join(other, 'aside')]);
  else say('  (no second file system here: the cross-disk kill points run on the same disk)');
  const perOp = Math.max(1, Math.round((KILLS - scanKills) / (2 * disks.length)));
  for (const [disk, aside] of disks) {
    // The shortest of three uninterrupted runs: on a busy machine one slow run would put most
    // kill moments after the end (a kill after the end tests nothing; the counts say how many).
    let applyMs = Infinity, undoMs = Infinity;
    for (let r = 0; r < 3; r++) {
      reset(aside);
      applyMs = Math.min(applyMs, timed(['apply', ledger, '--to', aside]));
      undoMs = Math.min(undoMs, timed(['undo', ledger]));
    }
    say(`kill matrix: apply and undo of ${originals.size} files, ${disk} (${(applyMs / 1000).toFixed(1)} s and ${(undoMs / 1000).toFixed(1)} s uninterrupted), ${perOp} kill points each`);
    for (let k = 0; k < perOp; k++) {
      const tl = t(`apply, ${disk}`);
      tl.points++;
      reset(aside);
      const at = 150 + rnd() * applyMs * 0.95;
      const how = await killAfter(['apply', ledger, '--to', aside], at);
      if (how === 'killed') tl.killed++;
      else tl.finishedFirst++;
      const label = `apply kill ${k} (${disk}) at ${at.toFixed(0)} ms`;
      const again = run(['apply', ledger, '--to', aside]);
      const s = ledgerState(ledger);
      let ok = check(again.code === 0, `${label}: the next apply exited ${again.code}: ${again.stderr.slice(-300)}`) && check(s.integrity === 'ok' && s.pending === 0, `${label}: integrity ${s.integrity}, ${s.pending} moves half done`) && everyOnce(aside, label);
      const undo = run(['undo', ledger]);
      ok = ok && check(undo.code === 0, `${label}: undo exited ${undo.code}: ${undo.stderr.slice(-300)}`) && allHome(`${label}, after undo`);
      if (ok) tl.recovered++;
    }
    for (let k = 0; k < perOp; k++) {
      const tl = t(`undo, ${disk}`);
      tl.points++;
      reset(aside);
      if (run(['apply', ledger, '--to', aside]).code !== 0) throw new Error('apply failed before an undo kill point');
      const at = 150 + rnd() * undoMs * 0.95;
      const how = await killAfter(['undo', ledger], at);
      if (how === 'killed') tl.killed++;
      else tl.finishedFirst++;
      const label = `undo kill ${k} (${disk}) at ${at.toFixed(0)} ms`;
      const s0 = ledgerState(ledger);
      let ok = check(s0.integrity === 'ok', `${label}: integrity ${s0.integrity} right after the kill`) && everyOnce(aside, `${label}, right after the kill`, true);
      const again = run(['undo', ledger]);
      const s = ledgerState(ledger);
      ok = ok && check(again.code === 0, `${label}: the next undo exited ${again.code}: ${again.stderr.slice(-300)}`) && check(s.integrity === 'ok' && s.pending === 0, `${label}: integrity ${s.integrity}, ${s.pending} moves half done`) && allHome(label) && everyOnce(aside, `${label}, after the next undo`);
      if (ok) tl.recovered++;
    }
  }
  if (other) rmSync(other, { recursive: true, force: true });
  return tally;
}

// ---------------------------------------------------------------- 2. fuzz

/** Peak memory of a process and, at each look, its children's together (ffmpeg, ffprobe). */
function watchMemory(pid: number): { stop(): { selfMB: number; childrenMB: number } } {
  let self = 0, kids = 0;
  const kb = (status: string, key: string): number => Number(new RegExp(`${key}:\\s+(\\d+)`).exec(status)?.[1] ?? 0);
  const look = (): void => {
    try {
      self = Math.max(self, kb(readFileSync(`/proc/${pid}/status`, 'utf8'), 'VmHWM'));
      let sum = 0;
      for (const task of readdirSync(`/proc/${pid}/task`)) {
        for (const c of readFileSync(`/proc/${pid}/task/${task}/children`, 'utf8').trim().split(/\s+/).filter(Boolean)) {
          try {
            sum += kb(readFileSync(`/proc/${c}/status`, 'utf8'), 'VmRSS');
          } catch {
            /* gone */
          }
        }
      }
      kids = Math.max(kids, sum);
    } catch {
      /* the process has ended */
    }
  };
  const timer = setInterval(look, 50);
  return {
    stop() {
      clearInterval(timer);
      return { selfMB: Math.round(self / 1024), childrenMB: Math.round(kids / 1024) };
    },
  };
}

async function fuzz(work: string): Promise<{ entries: number; kinds: Record<string, number>; outcomes: Record<string, number>; unaccounted: number; peakMB: number; childrenPeakMB: number; seconds: number }> {
  const card = path.join(work, 'fuzz-card');
  const entries: FuzzEntry[] = await writeFuzzCard(card, FUZZ, SEED);
  const ledger = path.join(work, 'fuzz.ledger');
  say(`fuzz: ${entries.length} entries (seed ${SEED}), scanned with 2 workers`);
  const t0 = performance.now();
  const c = start(['scan', card, '--ledger', ledger, '--workers', '2']);
  c.stdout!.resume();
  let err = '';
  c.stderr!.on('data', (d) => (err = (err + d).slice(-4000)));
  const mem = watchMemory(c.pid!);
  await exited(c);
  const peak = mem.stop();
  const seconds = (performance.now() - t0) / 1000;
  check(c.exitCode === 0, `fuzz scan exited ${c.exitCode}: ${err.slice(-400)}`);
  const report = JSON.parse(run(['report', ledger]).stdout) as { events: Array<{ files: string[] }>; errors: Array<{ file: string; stage: string }>; skipped: Array<{ file: string; reason: string }> };
  const where = new Map<string, string[]>();
  const put = (f: string, w: string): void => void where.set(f, [...(where.get(f) ?? []), w]);
  for (const e of report.events) for (const f of e.files) put(f, 'screened');
  for (const e of report.errors) put(e.file, e.stage === 'partial' ? 'partial' : 'error');
  for (const x of report.skipped) put(x.file, `skipped: ${x.reason}`);
  const kinds: Record<string, number> = {};
  const outcomes: Record<string, number> = {};
  let unaccounted = 0;
  for (const e of entries) {
    kinds[e.kind] = (kinds[e.kind] ?? 0) + 1;
    const w = (where.get(e.rel) ?? []).sort();
    // A clip screened in part is in its event and in the errors, which say which part.
    const once = w.length === 1 || (w.length === 2 && w[0] === 'partial' && w[1] === 'screened');
    const outcome = once ? w.join(' + ') : `${w.length} places`;
    outcomes[outcome] = (outcomes[outcome] ?? 0) + 1;
    if (!once) {
      unaccounted++;
      check(false, `fuzz: ${JSON.stringify(e.rel)} (${e.kind}) is in ${w.length ? w.join(', ') : 'nothing'}`);
    }
  }
  const listed = [...where.keys()].filter((f) => !entries.some((e) => e.rel === f));
  check(listed.length === 0, `fuzz: the report names entries the card does not have: ${listed.slice(0, 3).join(', ')}`);
  check(peak.selfMB < MEMORY_LIMIT_MB, `fuzz: the scan peaked at ${peak.selfMB} MB (limit ${MEMORY_LIMIT_MB})`);
  return { entries: entries.length, kinds, outcomes, unaccounted, peakMB: peak.selfMB, childrenPeakMB: peak.childrenMB, seconds };
}

// ---------------------------------------------------------------- 3. concurrency

async function concurrency(work: string): Promise<Record<string, string>> {
  const out: Record<string, string> = {};
  const card = path.join(work, 'conc-card');
  for (let d = 0; d < 6; d++) cpSync(path.join(SAMPLE, 'ridge-trail'), path.join(card, `cam${d}`), { recursive: true, preserveTimestamps: true });
  const originals = hashes(card);
  const ledger = path.join(work, 'conc.ledger');
  // Two scans at once: the second is refused while the first runs, and the first is unharmed.
  const first = start(['scan', card, '--ledger', ledger, '--workers', '2']);
  first.stdout!.resume();
  first.stderr!.resume();
  await sleep(1200);
  const second = run(['scan', card, '--ledger', ledger]);
  await exited(first);
  out['two scans at once'] = check(first.exitCode === 0 && second.code === 2 && /E_LEDGER_BUSY|in use by scan/.test(second.stderr), `two scans: first exited ${first.exitCode}, second ${second.code}: ${second.stderr.slice(-200)}`) ? 'second refused, first done' : 'FAILED';
  for (const v of ['likely-blank', 'unsure', 'motion']) run(['decide', ledger, '--set-aside', '--verdict', v]);
  // Two applies at once into different folders, the first across disks (slow): the second is
  // refused and leaves no folder; a dry run meanwhile changes nothing; undo brings back all.
  const other = otherDisk(work) ?? mkdtempSync(path.join(work, 'x-'));
  const a = path.join(other, 'aside-a'), b = path.join(work, 'aside-b');
  const apply = start(['apply', ledger, '--to', a]);
  apply.stdout!.resume();
  apply.stderr!.resume();
  await sleep(900);
  const running = apply.exitCode === null;
  const rival = run(['apply', ledger, '--to', b]);
  const dry = run(['apply', ledger, '--to', a, '--dry-run']);
  await exited(apply);
  const s = ledgerState(ledger);
  // When the first apply was over before the second started (a fast machine), there was no
  // second writer: then the second only finds nothing left to move, and must move nothing.
  const refused = rival.code === 2 && !existsSync(b);
  const nothingLeft = !running && rival.code === 0 && hashes(b).size === 0;
  out['two applies at once'] = check(refused || nothingLeft, `two applies: the second exited ${rival.code}${existsSync(b) ? ' and made its folder' : ''}: ${rival.stderr.slice(-200)}`) ? (refused ? 'second refused, no folder made' : 'the first had finished before the second started: nothing left to move, nothing moved') : 'FAILED';
  out['dry run during an apply'] = check(dry.code === 0 && apply.exitCode === 0 && s.failed === 0 && s.pending === 0, `dry run during apply: dry ${dry.code}, apply ${apply.exitCode}, ${s.failed} failed and ${s.pending} half-done moves`) ? 'apply finished whole, no move failed' : 'FAILED';
  const undo = run(['undo', ledger]);
  const home = hashes(card);
  // The apply's manifest stays in the set-aside folder as its record; no medium may.
  const left = hashes(path.join(a, path.basename(card))).size;
  out['undo after both'] = check(undo.code === 0 && home.size === originals.size && [...originals].every(([r, h]) => home.get(r) === h) && left === 0, `undo after the concurrent applies: exit ${undo.code}, ${home.size} of ${originals.size} home, ${left} left aside`) ? 'every file home, whole' : 'FAILED';
  rmSync(other, { recursive: true, force: true });
  return out;
}

// ---------------------------------------------------------------- 4. load

interface Answer {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: string;
}
function call(port: number, p: string, o: { method?: string; headers?: Record<string, string>; body?: string } = {}): Promise<Answer> {
  return new Promise((resolve, reject) => {
    const r = request({ host: '127.0.0.1', port, path: p, method: o.method ?? 'GET', headers: { host: `127.0.0.1:${port}`, ...o.headers } }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks).toString('utf8') }));
    });
    r.on('error', reject);
    r.end(o.body);
  });
}

async function load(work: string): Promise<Record<string, number | string>> {
  const ledger = path.join(work, 'load.ledger');
  cpSync(path.join(work, 'scan-base.ledger'), ledger);
  const server = start(['review', ledger, '--no-open']);
  server.stderr!.resume();
  const url = await new Promise<string>((resolve, reject) => {
    let out = '';
    server.stdout!.on('data', (d) => {
      out += d;
      const m = /(http:\/\/127\.0\.0\.1:\d+\/\?token=[\w-]+)/.exec(out);
      if (m) resolve(m[1]);
    });
    server.once('exit', (c) => reject(new Error(`review exited ${c}`)));
  });
  const port = Number(new URL(url).port);
  const signIn = await call(port, new URL(url).pathname + new URL(url).search);
  const cookie = String(signIn.headers['set-cookie']).split(';')[0];
  const session = await call(port, '/api/session', { headers: { cookie } });
  const key = String(session.headers['x-movesift-key']);
  const own = { cookie, origin: `http://127.0.0.1:${port}`, 'content-type': 'application/json', 'x-movesift-key': key };
  const ids = (JSON.parse((await call(port, '/api/events/ids', { headers: { cookie } })).body) as { ids: string[] }).ids;
  const latencies: number[] = [];
  let errors = 0, requests = 0;
  const errorKinds = new Map<string, number>();
  const until = performance.now() + LOAD_S * 1000;
  const client = async (n: number): Promise<void> => {
    const r = mulberry32(SEED * 1000 + n);
    while (performance.now() < until) {
      const id = ids[Math.floor(r() * ids.length)];
      const choice = r();
      const t0 = performance.now();
      try {
        const a =
          choice < 0.35 ? await call(port, `/api/events?offset=${Math.floor(r() * ids.length)}&limit=60`, { headers: { cookie } })
          : choice < 0.6 ? await call(port, `/api/events/${id}`, { headers: { cookie } })
          : choice < 0.8 ? await call(port, `/api/events/${id}/preview/frame/0`, { headers: { cookie } })
          : choice < 0.85 ? await call(port, '/api/deployments', { headers: { cookie } })
          : await call(port, '/api/decisions', { method: 'POST', headers: own, body: JSON.stringify({ events: [id], decision: r() < 0.5 ? 'keep' : 'set-aside', source: 'single', who: `load-${n}` }) });
        // A preview the scan did not make is a 404 by design (clips have none); anything else is an error.
        if (a.status >= 400 && !(a.status === 404 && choice >= 0.6 && choice < 0.8)) {
          errors++;
          errorKinds.set(`${a.status}`, (errorKinds.get(`${a.status}`) ?? 0) + 1);
        }
      } catch (e) {
        errors++;
        errorKinds.set((e as Error).message, (errorKinds.get((e as Error).message) ?? 0) + 1);
      }
      requests++;
      latencies.push(performance.now() - t0);
    }
  };
  await Promise.all(Array.from({ length: CLIENTS }, (_, n) => client(n)));
  latencies.sort((x, y) => x - y);
  const q = (p: number): number => Math.round(latencies[Math.min(latencies.length - 1, Math.floor(p * latencies.length))] * 10) / 10;
  const rssBefore = Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${server.pid}/status`, 'utf8'))?.[1] ?? 0) / 1024;
  // Hostile requests: another origin's write, and 256 MiB streamed at the server.
  const foreign = await call(port, '/api/decisions', { method: 'POST', headers: { ...own, origin: 'http://127.0.0.1:1' }, body: JSON.stringify({ events: [ids[0]], decision: 'keep', source: 'single' }) });
  const big = await new Promise<number>((resolve) => {
    const r = request({ host: '127.0.0.1', port, path: '/api/decisions', method: 'POST', headers: { host: `127.0.0.1:${port}`, ...own, 'transfer-encoding': 'chunked' } }, (res) => {
      res.resume();
      resolve(res.statusCode!);
      r.destroy();
    });
    r.on('error', () => resolve(-1));
    const chunk = Buffer.alloc(1 << 20, 0x20);
    let sent = 0;
    const pump = (): void => {
      while (sent < 256) {
        sent++;
        if (!r.write(chunk)) return void r.once('drain', pump);
      }
      r.end();
    };
    pump();
  });
  const rssAfter = Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${server.pid}/status`, 'utf8'))?.[1] ?? 0) / 1024;
  server.kill('SIGINT');
  await exited(server);
  check(errors === 0, `load: ${errors} of ${requests} requests failed (${[...errorKinds].map(([k, v]) => `${k}: ${v}`).join(', ')})`);
  check(foreign.status === 403, `load: a write from another origin answered ${foreign.status}`);
  check(big === 413, `load: a 256 MiB body answered ${big}`);
  check(rssAfter - rssBefore < 64, `load: the server grew ${Math.round(rssAfter - rssBefore)} MB taking a 256 MiB body`);
  return {
    clients: CLIENTS, seconds: LOAD_S, requests, errors, 'requests/s': Math.round(requests / LOAD_S), 'p50 ms': q(0.5), 'p99 ms': q(0.99),
    'foreign-origin write': foreign.status, '256 MiB body': big, 'server MB before/after the body': `${Math.round(rssBefore)}/${Math.round(rssAfter)}`,
  };
}

// ---------------------------------------------------------------- main

const work = mkdtempSync(path.join(os.tmpdir(), 'movesift-torture-'));
const t0 = performance.now();
try {
  const kills = await killMatrix(work);
  for (const [k, v] of Object.entries(kills)) say(`  ${k}: ${v.points} kill points, ${v.killed} killed mid-run, ${v.finishedFirst} finished before the kill, ${v.recovered} recovered`);
  const fz = await fuzz(work);
  say(`  ${fz.entries} entries in ${fz.seconds.toFixed(0)} s, ${fz.unaccounted} not accounted for exactly once; peak memory ${fz.peakMB} MB (children at most ${fz.childrenPeakMB} MB together; limit ${MEMORY_LIMIT_MB} MB)`);
  for (const [k, v] of Object.entries(fz.outcomes)) say(`    ${k}: ${v}`);
  const conc = await concurrency(work);
  say('concurrency:');
  for (const [k, v] of Object.entries(conc)) say(`  ${k}: ${v}`);
  const ld = await load(work);
  say(`load: ${Object.entries(ld).map(([k, v]) => `${k} ${v}`).join(', ')}`);
  const total = Object.values(kills).reduce((a, v) => a + v.points, 0);
  const recovered = Object.values(kills).reduce((a, v) => a + v.recovered, 0);
  say(`\n${total} kill points, ${recovered} recovered; ${fz.entries} fuzzed entries, ${fz.entries - fz.unaccounted} accounted for once; ${failures.length} failed check(s); ${((performance.now() - t0) / 60000).toFixed(1)} min`);
  if (opt.json) console.log(JSON.stringify({ kills, fuzz: fz, concurrency: conc, load: ld, failures }));
} finally {
  rmSync(work, { recursive: true, force: true });
}
process.exit(failures.length ? 1 : 0);
