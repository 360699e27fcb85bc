/**
 * End to end on the bundled sample media (our invented scenario) and on a real burst
 * (../shared/fixtures/real-ir-burst, MICA project via the Camtrap DP 1.0.2 example dataset,
 * CC-BY 4.0): the real command line, the real ledger, the report contract of DESIGN.md.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';
import { FIXTURES } from '../helpers/fixtures.js';
import { reportProblems } from '../helpers/report-shape.js';
import type { Report } from '../../src/pipeline/report.js';

describe('scan of sample-media', () => {
  let report: Report;
  let summary: string;
  beforeAll(() => {
    const ledger = path.join(tempDir(), 'sample.ledger');
    const scan = runCli(['scan', 'sample-media', '--ledger', ledger]);
    expect(scan.code, scan.stderr).toBe(0);
    summary = scan.stdout;
    const rep = runCli(['report', ledger, '--format', 'json']);
    expect(rep.code, rep.stderr).toBe(0);
    report = JSON.parse(rep.stdout);
  });

  it('writes a report of the documented shape', () => {
    expect(reportProblems(report)).toEqual([]);
    expect(report.errors).toEqual([]);
  });

  it('keeps every ground-truth animal event out of likely-blank', () => {
    const truth = JSON.parse(readFileSync(path.join(ROOT, 'sample-media/ground-truth.json'), 'utf8')) as { events: Array<{ files: string[]; animal: boolean; category: string }> };
    const byFiles = new Map(report.events.map((e) => [e.files.join('|'), e]));
    const rows = truth.events.map((t) => ({ category: t.category, animal: t.animal, verdict: byFiles.get(t.files.join('|'))?.verdict ?? 'not found' }));
    console.table(rows);
    expect(rows.filter((r) => r.verdict === 'not found')).toEqual([]); // grouping by capture time matches the triggers
    expect(rows.filter((r) => r.animal && r.verdict === 'likely-blank')).toEqual([]);
    expect(rows.filter((r) => r.animal).length).toBeGreaterThanOrEqual(8);
  });

  it('prints a summary whose counts match the report', () => {
    const count = (v: string): number => report.events.filter((e) => e.verdict === v).length;
    expect(summary).toContain(`into ${report.events.length} event(s)`);
    expect(summary).toContain(`Verdicts: ${count('likely-blank')} likely-blank, ${count('unsure')} unsure, ${count('motion')} motion.`);
  });

  it('gives the same report with two worker threads', () => {
    const ledger = path.join(tempDir(), 'pool.ledger');
    expect(runCli(['scan', 'sample-media', '--ledger', ledger, '--workers', '2']).code).toBe(0);
    expect(JSON.parse(runCli(['report', ledger]).stdout)).toEqual(report);
  });

  it('gives the clip activity windows inside its duration', () => {
    const clip = report.events.find((e) => e.kind === 'clip')!;
    expect(clip.files).toEqual(['reef-station/reef-drop-01.mp4']);
    expect(clip.windows.length).toBeGreaterThan(0);
    for (const w of clip.windows) expect(w.end_s).toBeLessThanOrEqual(24.01);
    // A clip lasts its duration: it ends 24 s after it starts (ffprobe reads 24.0 s).
    expect(Date.parse(clip.end) - Date.parse(clip.start)).toBe(24_000);
  });
});

describe('scan of a real infrared burst', () => {
  it('finds one event of ten frames with the source media table times, not likely-blank', () => {
    const ledger = path.join(tempDir(), 'real.ledger');
    expect(runCli(['scan', path.join(FIXTURES, 'real-ir-burst'), '--ledger', ledger]).code).toBe(0);
    const report = JSON.parse(runCli(['report', ledger]).stdout) as Report;
    expect(report.events).toHaveLength(1);
    const e = report.events[0];
    expect(e.files).toEqual(Array.from({ length: 10 }, (_, i) => `frame-${String(i + 1).padStart(2, '0')}.jpg`));
    // The source's media table: 2021-04-11 20:43:09 to 20:43:15 (+01:00); EXIF holds no offset.
    expect(e.start).toBe('2021-04-11T20:43:09');
    expect(e.end).toBe('2021-04-11T20:43:15');
    expect(e.kind).toBe('burst');
    expect(e.verdict).not.toBe('likely-blank');
  });
});
