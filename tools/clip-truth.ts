/**
 * Judges scan reports of survey clips against their ground truth, per family: each span with a
 * subject in view is found when some activity window overlaps it; kept time is the union of the
 * windows, subject time the union of the spans. The number to hold down is kept share minus
 * subject share (the bar: at most 12 points, with every span found).
 *
 * Real footage judged beside the generated clips: what a machine of this project can install
 * from Debian, with spans read off its frames by eye (stated with each).
 */
import type { Report } from '../src/pipeline/report.js';

export interface ClipTruth {
  family: string;
  /** File name inside the family's folder. */
  file: string;
  durationS: number;
  /** Spans (s) with a subject in view. */
  subject: Array<{ start_s: number; end_s: number }>;
  source: string;
}

export const REAL_CLIPS: ReadonlyArray<{ path: string; install: string; truth: ClipTruth }> = [
  {
    path: '/usr/share/doc/opencv-doc/examples/data/tree.avi',
    install: 'apt-get install opencv-doc',
    truth: {
      family: 'real',
      file: 'tree.avi',
      durationS: 29.6,
      // A tree in wind for the whole clip; a hand enters at the top right at 23.25 s (the first
      // frame it shows in, read by eye at 4 frames a second) and stays to the end.
      subject: [{ start_s: 23.25, end_s: 29.6 }],
      source: 'OpenCV sample data, examples/data/tree.avi of Debian opencv-doc 4.6.0 (Apache-2.0 AND BSD-3-Clause)',
    },
  },
];

export interface ClipFamilyResult {
  family: string;
  clips: number;
  spans: number;
  spansFound: number;
  durationS: number;
  subjectS: number;
  keptS: number;
  missed: string[];
  perClip: Array<{ file: string; subjectShare: number; keptShare: number; found: string }>;
}

type Span = { start_s: number; end_s: number };

function unionLength(spans: readonly Span[], end: number): number {
  const s = [...spans].map((x) => ({ a: Math.max(0, x.start_s), b: Math.min(end, x.end_s) })).filter((x) => x.b > x.a).sort((p, q) => p.a - q.a);
  let total = 0;
  let a = -1, b = -1;
  for (const x of s) {
    if (x.a > b) {
      if (b > a) total += b - a;
      a = x.a;
      b = x.b;
    } else b = Math.max(b, x.b);
  }
  if (b > a) total += b - a;
  return total;
}

export function judgeClips(reports: ReadonlyArray<{ family: string; report: Report }>, truth: readonly ClipTruth[]): ClipFamilyResult[] {
  return reports.map(({ family, report }) => {
    const r: ClipFamilyResult = { family, clips: 0, spans: 0, spansFound: 0, durationS: 0, subjectS: 0, keptS: 0, missed: [], perClip: [] };
    for (const t of truth.filter((x) => x.family === family)) {
      const e = report.events.find((x) => x.files[0] === t.file);
      if (!e) {
        r.missed.push(`${t.file}: not in the report`);
        continue;
      }
      r.clips++;
      r.durationS += t.durationS;
      const subject = unionLength(t.subject, t.durationS);
      const keptS = unionLength(e.windows, t.durationS);
      r.subjectS += subject;
      r.keptS += keptS;
      let found = 0;
      for (const s of t.subject) {
        r.spans++;
        if (e.windows.some((w) => w.start_s <= s.end_s && w.end_s >= s.start_s)) found++;
        else r.missed.push(`${t.file} ${s.start_s.toFixed(1)}-${s.end_s.toFixed(1)} s`);
      }
      r.spansFound += found;
      r.perClip.push({ file: t.file, subjectShare: subject / t.durationS, keptShare: keptS / t.durationS, found: `${found}/${t.subject.length}` });
    }
    return r;
  });
}

export function printClipTable(results: readonly ClipFamilyResult[], facts: Record<string, { heldOut: boolean }>): void {
  const pct = (v: number) => `${(100 * v).toFixed(1)}%`;
  console.table(
    results.map((r) => ({
      family: r.family,
      'held out': facts[r.family]?.heldOut ? 'yes' : 'no (fitted)',
      clips: r.clips,
      'subject spans found': `${r.spansFound}/${r.spans}`,
      'time with subject': pct(r.subjectS / r.durationS),
      'time kept': pct(r.keptS / r.durationS),
      'kept minus subject (points)': (100 * (r.keptS - r.subjectS) / r.durationS).toFixed(1),
    })),
  );
  for (const r of results) {
    for (const c of r.perClip) console.log(`  ${r.family} ${c.file}: subject ${pct(c.subjectShare)}, kept ${pct(c.keptShare)}, spans found ${c.found}`);
    for (const m of r.missed) console.log(`  missed: ${r.family} ${m}`);
  }
}
