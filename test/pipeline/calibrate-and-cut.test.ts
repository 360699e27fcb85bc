/**
 * calibrate: refuses with too few labelled animals; on a large ledger its threshold and bound
 * equal an independent computation whose bound comes from @stdlib/stats-binomial-test (the
 * one-sided 95% lower bound is the lower end of the two-sided 90% interval). cut: each activity
 * window becomes a file whose length ffprobe confirms (exact mode to 0.15 s; stream copies never
 * shorter than their window), with an index and a MaxN sheet.
 */
import { spawnSync } from 'node:child_process';
import { cpSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { openLedger } from '../../src/ledger/open-ledger.js';
import { createReviewQueries } from '../../src/ledger/review-queries.js';
import { fillSynthetic } from '../../src/ledger/synthetic-fill.js';
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { MOVING_LIGHT_BLANK } from '../../src/kernels/score.js';
import { resolveBinaries } from '../../src/media/ffmpeg-binaries.js';
import { parseCsv } from '../../src/pipeline/deployments-table.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';

const binomialTest = createRequire(import.meta.url)('@stdlib/stats-binomial-test') as (k: number, n: number, o: { alpha: number }) => { ci: [number, number] };

describe('movesift calibrate', () => {
  it('refuses when too few animals are labelled, and says how many are needed', () => {
    const ledger = path.join(tempDir('movesift-cal-'), 'c.ledger');
    expect(runCli(['scan', 'sample-media/ridge-trail', '--ledger', ledger]).code).toBe(0);
    expect(runCli(['decide', ledger, '--keep', '--verdict', 'motion']).code).toBe(0);
    const r = runCli(['calibrate', ledger, '--recall', '0.99']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/needs at least 299/);
  });

  it('proposes the highest threshold whose 95% lower recall bound reaches the target, and re-verdicts only undecided events', async () => {
    const ledger = path.join(tempDir('movesift-cal-big-'), 'c.ledger');
    expect(runCli(['scan', 'sample-media', '--ledger', ledger]).code).toBe(0);
    const db = openLedger(ledger);
    fillSynthetic(db, 3000);
    // Every tenth image analysis as if made without a background from other triggers.
    db.prepare("UPDATE analyses SET features = json_set(features, '$.context.noBackground', json('true')) WHERE id % 10 = 0 AND event_id IN (SELECT id FROM events WHERE kind != 'clip')").run();
    // And every seventh as if analysed under moving light (a cloud shadow drifting over).
    db.prepare("UPDATE analyses SET features = json_set(features, '$.context.movingLight', json('true')) WHERE id % 7 = 3 AND event_id IN (SELECT id FROM events WHERE kind != 'clip')").run();
    const q = createReviewQueries(db);
    // Image events only (clips have their own model). An event analysed without a background
    // from other triggers is never likely-blank, so it counts as kept and keeps its verdict; one
    // under moving light is likely-blank only below MOVING_LIGHT_BLANK, so above that it counts
    // as kept too.
    const rows = db
      .prepare(
        `SELECT a.event_id, a.score, coalesce(json_extract(a.features, '$.context.noBackground'), json_extract(a.features, '$.context.noReference'), 0) AS noBackground,
           coalesce(json_extract(a.features, '$.context.movingLight'), 0) AS movingLight
         FROM analyses a JOIN events e ON e.id = a.event_id WHERE e.kind != 'clip' ORDER BY a.score`,
      )
      .all() as Array<{ event_id: string; score: number; noBackground: number; movingLight: number }>;
    const clipsBefore = db.prepare("SELECT a.event_id, a.verdict FROM analyses a JOIN events e ON e.id = a.event_id WHERE e.kind = 'clip' ORDER BY 1").all();
    expect(rows.some((r) => r.noBackground)).toBe(true);
    const counted = (x: { score: number; noBackground: number; movingLight: number }) => (x.noBackground || (x.movingLight && x.score >= MOVING_LIGHT_BLANK) ? 1 : x.score);
    // Some moving-light events on either side of the low threshold, among those kept below.
    expect(rows.filter((r) => r.movingLight && !r.noBackground && r.score < MOVING_LIGHT_BLANK).length).toBeGreaterThan(0);
    expect(rows.filter((r) => r.movingLight && !r.noBackground && r.score >= MOVING_LIGHT_BLANK && r.score < MOTION_MODEL.thresholds.blank).length).toBeGreaterThan(0);
    // People kept what scored 0.2 or more (a few low ones too) and set aside the rest.
    const keep = rows.filter((r, i) => r.score >= 0.2 || i % 97 === 0).map((r) => r.event_id);
    const aside = rows.filter((r) => !keep.includes(r.event_id)).slice(0, 500).map((r) => r.event_id);
    q.decide(keep, 'keep', 'bulk', 'ci');
    q.decide(aside, 'set-aside', 'bulk', 'ci');
    db.close();
    const r = runCli(['calibrate', ledger, '--recall', '0.99']);
    expect(r.code, r.stderr).toBe(0);
    // Independent: walk up the kept scores while the stdlib bound holds.
    const scores = rows.filter((x) => keep.includes(x.event_id)).map(counted).sort((a, b) => a - b);
    let expected = 0;
    for (let i = 0; i < scores.length; i++) {
      if (binomialTest(scores.length - i, scores.length, { alpha: 0.1 }).ci[0] < 0.99) break;
      expected = scores[i];
    }
    expect(r.stdout).toContain(`Proposed likely-blank threshold: ${expected.toFixed(4)}`);
    const before = new Database(ledger, { readonly: true });
    const decided = before.prepare("SELECT a.event_id, a.verdict FROM analyses a JOIN latest_decisions d ON d.event_id = a.event_id WHERE d.decision IS NOT NULL ORDER BY 1").all();
    before.close();
    expect(runCli(['calibrate', ledger, '--recall', '0.99', '--apply']).code).toBe(0);
    const after = new Database(ledger, { readonly: true });
    expect(after.prepare("SELECT a.event_id, a.verdict FROM analyses a JOIN latest_decisions d ON d.event_id = a.event_id WHERE d.decision IS NOT NULL ORDER BY 1").all()).toEqual(decided);
    const undecided = after
      .prepare(
        `SELECT a.score, a.verdict, coalesce(json_extract(a.features, '$.context.noBackground'), json_extract(a.features, '$.context.noReference'), 0) AS noBackground,
           coalesce(json_extract(a.features, '$.context.movingLight'), 0) AS movingLight
         FROM analyses a JOIN events e ON e.id = a.event_id LEFT JOIN latest_decisions d ON d.event_id = a.event_id WHERE d.decision IS NULL AND e.kind != 'clip'`,
      )
      .all() as Array<{ score: number; verdict: string; noBackground: number; movingLight: number }>;
    expect(undecided.length).toBeGreaterThan(0);
    for (const u of undecided) expect(u.verdict === 'likely-blank').toBe(counted(u) < expected);
    expect(after.prepare("SELECT a.event_id, a.verdict FROM analyses a JOIN events e ON e.id = a.event_id WHERE e.kind = 'clip' ORDER BY 1").all()).toEqual(clipsBefore);
    expect((after.prepare('SELECT count(*) AS n FROM calibrations WHERE applied = 1').get() as { n: number }).n).toBe(1);
    after.close();
  }, 180_000);
});

describe('movesift cut', () => {
  const ledger = path.join(tempDir('movesift-cut-'), 'k.ledger');
  const { ffmpeg, ffprobe } = resolveBinaries();
  const probe = (file: string): number => Number(spawnSync(ffprobe, ['-v', 'error', '-show_entries', 'format=duration', '-of', 'csv=p=0', file], { encoding: 'utf8' }).stdout.trim());
  const source = path.join(ROOT, 'sample-media/reef-station/reef-drop-01.mp4');
  // Keyframe times of the source, from ffprobe: a stream copy can only start on one of these.
  const keyframes = spawnSync(ffprobe, ['-v', 'error', '-select_streams', 'v:0', '-skip_frame', 'nokey', '-show_entries', 'frame=pts_time', '-of', 'csv=p=0', source], { encoding: 'utf8' }).stdout.split(/[\s,]+/).filter(Boolean).map(Number);
  const gop = Math.max(...keyframes.slice(1).map((k, i) => k - keyframes[i]), 0.5);
  /** The first decoded frame of a file, or of the source at time t, as raw RGB. */
  const frameAt = (file: string, t?: number): Buffer =>
    spawnSync(ffmpeg, ['-v', 'error', ...(t === undefined ? [] : ['-ss', t.toFixed(3)]), '-i', file, '-frames:v', '1', '-f', 'rawvideo', '-pix_fmt', 'rgb24', '-'], { maxBuffer: 64 << 20 }).stdout;

  it.each([[false], [true]])('writes each activity window as a file matching the ledger, within one GOP (exact: %s)', (exact) => {
    if (exact === false) expect(runCli(['scan', path.join(ROOT, 'sample-media/reef-station'), '--ledger', ledger]).code).toBe(0);
    const out = path.join(path.dirname(ledger), exact ? 'exact' : 'copy');
    const r = runCli(['cut', ledger, '--out', out, ...(exact ? ['--exact'] : [])]);
    expect(r.code, r.stderr).toBe(0);
    const report = JSON.parse(runCli(['report', ledger]).stdout) as { events: Array<{ kind: string; windows: Array<{ start_s: number; end_s: number; score: number }> }> };
    const windows = report.events.find((e) => e.kind === 'clip')!.windows;
    expect(windows.length).toBeGreaterThan(0);
    const [head, ...index] = parseCsv(readFileSync(path.join(out, 'windows-index.csv'), 'utf8'));
    const col = (row: string[], name: string) => row[head.indexOf(name)];
    expect(index.map((row) => [Number(col(row, 'start_s')), Number(col(row, 'end_s')), Number(col(row, 'score'))])).toEqual(windows.map((w) => [w.start_s, w.end_s, w.score]));
    const [, ...sheet] = parseCsv(readFileSync(path.join(out, 'maxn-sheet.csv'), 'utf8'));
    expect(sheet).toHaveLength(windows.length);
    index.forEach((row, i) => {
      const file = path.join(out, col(row, 'file'));
      const want = windows[i].end_s - windows[i].start_s;
      const d = probe(file);
      if (exact) {
        expect(Math.abs(d - want)).toBeLessThan(0.15);
        expect(Number(col(row, 'file_start_s'))).toBe(windows[i].start_s);
        // Re-encoded, so not byte-equal: its first frame is nearer the source frame at the window
        // start than any source frame up to half a second either side (the clip runs at 8 fps).
        const first = frameAt(file);
        const mad = (b: Buffer) => b.reduce((a, v, k) => a + Math.abs(v - first[k]), 0) / b.length;
        const at = (dt: number) => mad(frameAt(source, Math.max(0, windows[i].start_s + dt)));
        const here = at(0);
        expect(here).toBeLessThan(3);
        for (const dt of [-0.5, -0.25, 0.25, 0.5]) if (windows[i].start_s + dt >= 0) expect(here).toBeLessThanOrEqual(at(dt));
      } else {
        // A copy starts on the last keyframe at or before the window: never late, at most a GOP early.
        const key = Math.max(...keyframes.filter((k) => k <= windows[i].start_s + 1e-3));
        expect(windows[i].start_s - key).toBeLessThanOrEqual(gop);
        expect(d).toBeGreaterThanOrEqual(want - 0.15);
        expect(d).toBeLessThanOrEqual(want + gop + 0.15);
        expect(frameAt(file).equals(frameAt(source, key))).toBe(true); // its first frame is that keyframe
        // and the index says so: a time read in the file plus file_start_s is the source time.
        expect(Number(col(row, 'file_start_s'))).toBeCloseTo(key, 3);
      }
    });
  }, 120_000);
});

describe('what cut and apply write never replaces a file', () => {
  it('cut refuses a folder holding an earlier cut, leaving its filled-in MaxN sheet as it was', () => {
    const dir = tempDir('movesift-recut-');
    const ledger = path.join(dir, 'r.ledger');
    expect(runCli(['scan', path.join(ROOT, 'sample-media/reef-station'), '--ledger', ledger]).code).toBe(0);
    const out = path.join(dir, 'windows');
    expect(runCli(['cut', ledger, '--out', out]).code).toBe(0);
    const sheet = path.join(out, 'maxn-sheet.csv');
    const filled = readFileSync(sheet, 'utf8').replace(/,,,,,\n/, ',grouper,3,12.5,reef volunteer,\n');
    writeFileSync(sheet, filled);
    const again = runCli(['cut', ledger, '--out', out]);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/holds an earlier cut .*Choose a new folder/);
    expect(readFileSync(sheet, 'utf8')).toBe(filled);
  }, 120_000);

  it('an apply of another ledger into the same folder keeps the first manifest and takes the next free name', () => {
    const dir = tempDir('movesift-manifests-');
    const aside = path.join(dir, 'aside');
    const manifests: string[] = [];
    for (const cam of ['ridge-trail', 'creek-bend']) {
      const ledger = path.join(dir, `${cam}.ledger`);
      cpSync(path.join(ROOT, 'sample-media', cam), path.join(dir, 'cards', cam), { recursive: true });
      expect(runCli(['scan', path.join(dir, 'cards', cam), '--ledger', ledger]).code).toBe(0);
      expect(runCli(['decide', ledger, '--set-aside', '--verdict', 'likely-blank']).code).toBe(0);
      const r = runCli(['apply', ledger, '--to', aside]);
      expect(r.code, r.stderr).toBe(0);
    }
    for (const f of readdirSync(aside).filter((f) => f.startsWith('movesift-manifest-')).sort()) manifests.push(readFileSync(path.join(aside, f), 'utf8'));
    expect(readdirSync(aside).filter((f) => f.startsWith('movesift-manifest-')).sort()).toEqual(['movesift-manifest-1-2.csv', 'movesift-manifest-1.csv']);
    expect(manifests[1]).toContain('ridge-trail'); // the first apply's manifest, untouched
    expect(manifests[0]).toContain('creek-bend');
  }, 120_000);
});
