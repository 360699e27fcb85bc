/**
 * Bad input never stops a scan: each bad file gets an error row with a stable code and a plain
 * message, in the summary and in the report's `errors`, and every other file is screened.
 * Bad usage exits 2 with a sentence. (Cases from the scan issue; files built here in a
 * temporary folder from the project's own sample media.)
 */
import { copyFileSync, mkdirSync, readFileSync, symlinkSync, unlinkSync, writeFileSync, chmodSync } from 'node:fs';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import { beforeAll, describe, expect, it } from 'vitest';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';
import { reportProblems } from '../helpers/report-shape.js';
import { scan } from '../../src/pipeline/scan.js';
import { runEventTask } from '../../src/pipeline/analyse-task.js';
import { buildReport, type Report } from '../../src/pipeline/report.js';
import { resolveBinaries } from '../../src/media/ffmpeg-binaries.js';
import sharp from 'sharp';

const SAMPLE = path.join(ROOT, 'sample-media/ridge-trail');

function buildFolder(): string {
  const dir = tempDir('movesift-bad-');
  const cam = path.join(dir, 'cam one');
  mkdirSync(cam);
  copyFileSync(path.join(SAMPLE, 'IMG_0001.JPG'), path.join(cam, `IMG 0001 "quoted" 'single'.JPG`));
  copyFileSync(path.join(SAMPLE, 'IMG_0002.JPG'), path.join(cam, 'Élan ñandú 0002.JPG'));
  copyFileSync(path.join(SAMPLE, 'IMG_0003.JPG'), path.join(cam, 'IMG_0003.jpg'));
  writeFileSync(path.join(cam, 'zero.jpg'), '');
  const jpeg = readFileSync(path.join(SAMPLE, 'IMG_0004.JPG'));
  writeFileSync(path.join(cam, 'cut.jpg'), jpeg.subarray(0, Math.floor(jpeg.length * 0.4)));
  writeFileSync(path.join(cam, 'letter.jpg'), 'Dear reader, this is not a photograph.\n');
  writeFileSync(path.join(cam, 'notes.mp4'), 'not a video either\n');
  writeFileSync(path.join(cam, '.hidden.jpg'), 'x');
  writeFileSync(path.join(cam, '._IMG_0001.JPG'), 'x');
  writeFileSync(path.join(cam, 'Thumbs.db'), 'x');
  symlinkSync('..', path.join(cam, 'loop')); // a link back up must not make the walk loop
  // Damage in the middle of the scan data that a 1/8-scale decode does not read (it takes only
  // the DC coefficients): it once passed the read pass and then failed in its event.
  const flipped = Buffer.from(readFileSync(path.join(SAMPLE, 'IMG_0005.JPG')));
  for (let k = 0; k < 40; k++) flipped[Math.floor(flipped.length / 3) + Math.floor((k * flipped.length * 0.6) / 40)] ^= 0xff;
  writeFileSync(path.join(cam, 'flipped.jpg'), flipped);
  // Entries that are not regular files, named like photos.
  spawnSync('mkfifo', [path.join(cam, 'pipe.JPG')]);
  mkdirSync(path.join(cam, 'folder.JPG'));
  symlinkSync('gone.JPG', path.join(cam, 'dangling.JPG'));
  writeFileSync(path.join(cam, 'readme.txt'), 'deployment notes\n');
  // An MP4 with its index (moov) at the end, cut in half: the broken-index case.
  const { ffmpeg } = resolveBinaries();
  const full = path.join(dir, 'full.mp4.tmp');
  spawnSync(ffmpeg, ['-v', 'error', '-y', '-f', 'lavfi', '-i', 'testsrc=size=320x240:rate=10', '-t', '3', '-c:v', 'libx264', '-pix_fmt', 'yuv420p', '-f', 'mp4', full]);
  const mp4 = readFileSync(full);
  unlinkSync(full);
  writeFileSync(path.join(cam, 'broken.mp4'), mp4.subarray(0, Math.floor(mp4.length / 2)));
  return dir;
}

describe('a clip cut short', () => {
  it('is recorded as partial with the span screened, never likely-blank, and never set aside', () => {
    // The sample clip (24 s, the index at the front) cut to its first 30 KB of about 113 KB: the
    // container still declares 24 s, the frames end after about 6.
    const dir = tempDir('movesift-short-');
    mkdirSync(path.join(dir, 'station'));
    writeFileSync(path.join(dir, 'station', 'cut.mp4'), readFileSync(path.join(ROOT, 'sample-media/reef-station/reef-drop-01.mp4')).subarray(0, 30_000));
    const ledger = path.join(dir, 's.ledger');
    const r = runCli(['scan', dir, '--ledger', ledger]);
    expect(r.code, r.stderr).toBe(0);
    const report = JSON.parse(runCli(['report', ledger]).stdout) as Report;
    expect(report.errors).toHaveLength(1);
    expect(report.errors[0]).toMatchObject({ file: 'station/cut.mp4', code: 'E_VIDEO_SHORT' });
    const m = /declares 24\.0 s but its frames end at ([\d.]+) s/.exec(report.errors[0].message)!;
    expect(Number(m[1])).toBeLessThan(12);
    expect(report.events).toHaveLength(1);
    expect(report.events[0].verdict).not.toBe('likely-blank');
    // Set aside by a person anyway, apply leaves it where it is.
    expect(runCli(['decide', ledger, '--set-aside', '--deployment', 'station']).code).toBe(0);
    expect(runCli(['apply', ledger, '--to', path.join(tempDir('movesift-short-aside-'), 'aside'), '--dry-run']).stdout).toContain('No set-aside media left to move');
  });
});

describe('bad input in a scanned folder', () => {
  let report: Report;
  let stdout: string;
  let stderr: string;
  let dir: string;
  beforeAll(() => {
    dir = buildFolder();
    const ledger = path.join(dir, 'out', 'bad.ledger');
    const r = runCli(['scan', dir, '--ledger', ledger]);
    expect(r.code, r.stderr).toBe(0);
    stdout = r.stdout;
    stderr = r.stderr;
    report = JSON.parse(runCli(['report', ledger]).stdout);
  });

  it('records each bad file with its code and still screens the good ones', () => {
    expect(reportProblems(report)).toEqual([]);
    const codes = Object.fromEntries(report.errors.map((e) => [e.file, e.code]));
    expect(codes).toEqual({
      'cam one/zero.jpg': 'E_MEDIA_EMPTY',
      'cam one/cut.jpg': 'E_MEDIA_TRUNCATED',
      'cam one/letter.jpg': 'E_MEDIA_NOT_MEDIA',
      'cam one/notes.mp4': 'E_MEDIA_NOT_MEDIA',
      'cam one/broken.mp4': 'E_VIDEO_PROBE_FAILED',
      'cam one/flipped.jpg': 'E_MEDIA_DECODE_FAILED',
    });
    for (const e of report.errors) expect(e.message.startsWith(e.file)).toBe(true);
    const files = report.events.flatMap((e) => e.files).sort();
    expect(files).toEqual([`cam one/IMG 0001 "quoted" 'single'.JPG`, 'cam one/IMG_0003.jpg', 'cam one/Élan ñandú 0002.JPG'].sort());
    expect(report.events).toHaveLength(1); // the three good frames are one burst by capture time
  });

  it('accounts for every entry under the folder once: screened, an error, or passed over with a reason', async () => {
    const flipped = readFileSync(path.join(dir, 'cam one/flipped.jpg'));
    await expect(sharp(flipped, { failOn: 'warning' }).resize(48, 48, { fit: 'inside' }).raw().toBuffer()).resolves.toBeDefined(); // the case is real
    const where = new Map<string, string[]>();
    const put = (file: string, what: string): void => void where.set(file, [...(where.get(file) ?? []), what]);
    for (const e of report.events) for (const f of e.files) put(f, 'screened');
    for (const e of report.errors) put(e.file, `error:${e.stage}`);
    for (const x of report.skipped) put(x.file, `skipped:${x.reason}`);
    // Every entry on disk (folders are walked, so their entries count instead), found independently.
    const onDisk = spawnSync('find', ['.', '-mindepth', '1', '-not', '-type', 'd', '-o', '-type', 'd', '-empty', '-prune'], { cwd: dir, encoding: 'utf8' }).stdout.trim().split('\n').map((f) => f.slice(2));
    const walked = onDisk.filter((f) => !f.startsWith('out/') && f !== 'cam one/folder.JPG');
    for (const f of walked) expect(where.get(f), f).toHaveLength(1);
    expect(where.get('cam one/flipped.jpg')).toEqual(['error:read']);
    expect(where.get('cam one/pipe.JPG')).toEqual(['skipped:not-a-regular-file']);
    expect(where.get('cam one/dangling.JPG')).toEqual(['skipped:broken-link']);
    expect(where.get('cam one/readme.txt')).toEqual(['skipped:not-media']);
    expect(where.get('cam one/Thumbs.db')).toEqual(['skipped:hidden-or-system']);
    expect(where.get('cam one/loop')).toEqual(['skipped:folder-already-scanned']);
    expect([...where.keys()].filter((f) => !walked.includes(f) && !f.startsWith('out/'))).toEqual([]);
  });

  it('says so in the summary and prints each error', () => {
    expect(stdout).toContain('6 file(s) could not be screened');
    expect(stdout).toMatch(/Passed over .*1 broken or looping link.*1 not a regular file/);
    expect(stderr).toContain('E_MEDIA_TRUNCATED');
  });

  it('a rerun skips what is unchanged and keeps the same errors', () => {
    const ledger = path.join(dir, 'out', 'bad.ledger');
    const r = runCli(['scan', dir, '--ledger', ledger]);
    expect(r.stdout).toContain('(0 screened now, 1 unchanged and skipped)');
    const again = JSON.parse(runCli(['report', ledger]).stdout) as Report;
    // The ledger made by the first scan lies in the scanned folder now: passed over as the tool's own.
    const own = again.skipped.filter((x) => x.file.startsWith('out/'));
    expect(own.map((x) => x.file)).toEqual(expect.arrayContaining(['out/bad.ledger', 'out/bad.ledger.previews']));
    expect(new Set(own.map((x) => x.reason))).toEqual(new Set(['ledger-files'])); // with SQLite's -wal and -shm while open
    expect({ ...again, skipped: again.skipped.filter((x) => !x.file.startsWith('out/')) }).toEqual(report);
  });

  it('records a file that vanishes mid-scan and goes on', async () => {
    const d = tempDir('movesift-vanish-');
    for (const n of ['IMG_0001.JPG', 'IMG_0002.JPG', 'IMG_0003.JPG', 'IMG_0004.JPG', 'IMG_0005.JPG', 'IMG_0006.JPG']) copyFileSync(path.join(SAMPLE, n), path.join(d, n));
    const ledger = path.join(d, 'v.ledger');
    await scan({ roots: [d], ledger, runner: async (task) => { if (task.files.some((f) => f.display === 'IMG_0002.JPG')) unlinkSync(path.join(d, 'IMG_0002.JPG')); return runEventTask(task); } });
    const r = buildReport(ledger);
    expect(r.errors.map((e) => [e.file, e.code])).toEqual([['IMG_0002.JPG', 'E_MEDIA_VANISHED']]);
    expect(r.events.length).toBe(2);
    expect(r.events[0].files).toEqual(['IMG_0001.JPG', 'IMG_0002.JPG', 'IMG_0003.JPG']); // the event keeps its members; the lost frame is an error
  });
});

describe('bad usage', () => {
  it('exits 2 with a sentence for a folder that does not exist', () => {
    const r = runCli(['scan', '/no/such/folder', '--ledger', path.join(tempDir(), 'x.ledger')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/no such folder; check the path/);
  });
  it('exits 2 when the ledger cannot be written', () => {
    const d = tempDir();
    const ro = path.join(d, 'ro');
    mkdirSync(ro);
    writeFileSync(path.join(ro, 'blocker'), 'a file where a folder is needed');
    const r = runCli(['scan', path.join(ROOT, 'sample-media/reef-station'), '--ledger', path.join(ro, 'blocker', 'x.ledger')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/cannot open the ledger here.*choose a folder you can write to/);
    chmodSync(ro, 0o755);
  });
  it('exits 2 for a file that is not a ledger, a missing flag and a bad number', () => {
    const d = tempDir();
    writeFileSync(path.join(d, 'notes.txt'), 'not sqlite');
    expect(runCli(['report', path.join(d, 'notes.txt')]).code).toBe(2);
    expect(runCli(['scan', 'sample-media']).stderr).toMatch(/--ledger <file> is required/);
    const bad = runCli(['scan', 'sample-media', '--ledger', path.join(d, 'l'), '--analysis-width', 'wide']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--analysis-width: wanted integer 64-4096, got "wide"/);
    expect(runCli(['frobnicate']).code).toBe(2);
  });
  it('says usage problems plainly: no doubled prefix, no parser text, a version, a misspelt deployment named', () => {
    expect(runCli(['scan']).stderr.trim()).toBe('movesift scan: give at least one folder to scan. See `movesift scan --help`.');
    expect(runCli(['scan', 'x', '--bogus']).stderr.trim()).toBe('movesift scan: --bogus is not an option of this command. See `movesift scan --help`.');
    expect(runCli(['report', 'x.ledger', '--format']).stderr.trim()).toBe('movesift report: --format needs a value after it. See `movesift report --help`.');
    const v = runCli(['--version']);
    expect(v.code).toBe(0);
    expect(v.stdout).toMatch(/^movesift \d+\.\d+\.\d+ \(engine \d+\.\d+\.\d+\+[0-9a-f]{10}\.r\d+\)\n$/);
    const d = tempDir();
    const ledger = path.join(d, 'l.ledger');
    expect(runCli(['scan', path.join(ROOT, 'sample-media/ridge-trail'), '--ledger', ledger]).code).toBe(0);
    const typo = runCli(['decide', ledger, '--set-aside', '--deployment', 'ridge-trial']);
    expect(typo.code).toBe(2);
    expect(typo.stderr.trim()).toBe('movesift decide: --deployment: no deployment "ridge-trial" in this ledger; it has "ridge-trail".');
  });
  it('prints help for every command', () => {
    for (const c of ['scan', 'report', 'decide']) {
      const r = runCli([c, '--help']);
      expect(r.code).toBe(0);
      expect(r.stdout).toMatch(new RegExp(`^Usage: movesift ${c}`));
    }
  });
});
