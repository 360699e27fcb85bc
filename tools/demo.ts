/**
 * `npm run demo`: scans the bundled sample media (an invented scenario from our own generator,
 * see sample-media/ground-truth.json) into demo-output/demo.ledger with the real scan pipeline,
 * then prints what the screener proposes next to the truth, and the command that opens the
 * result. Run again, it resumes (decisions made in the app stay). Nothing is moved or deleted.
 * `--ledger <file>` writes elsewhere (the test does).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { scan } from '../src/pipeline/scan.js';
import { buildReport } from '../src/pipeline/report.js';
import { formatSummary } from '../src/cli/scan-command.js';
import { progressPrinter } from '../src/cli/progress-bar.js';

const repo = path.resolve(import.meta.dirname, '..');
const root = path.join(repo, 'sample-media');
const { values } = parseArgs({ options: { ledger: { type: 'string' } } });
const ledger = path.resolve(values.ledger ?? path.join(repo, 'demo-output', 'demo.ledger'));
const shown = path.relative(process.cwd(), ledger) || ledger;
console.log(`Movesift demo: screening ${root}\n(an invented scenario: two trail-camera deployments and one underwater clip, all generated)\n`);
const summary = await scan({ roots: [root], ledger, onProgress: progressPrinter(process.stderr.isTTY ? 'bar' : 'quiet') });
const report = buildReport(ledger);
const truth = JSON.parse(readFileSync(path.join(root, 'ground-truth.json'), 'utf8')) as { events: Array<{ files: string[]; category: string; animal: boolean }>; clips: Record<string, { fishInView: Array<{ start_s: number; end_s: number }> }> };
const byFirst = new Map(truth.events.map((t) => [t.files[0], t]));
console.table(
  report.events.map((e) => {
    const t = byFirst.get(e.files[0]);
    const clip = truth.clips[e.files[0]];
    return {
      deployment: e.deployment,
      kind: e.kind,
      files: e.files.length,
      start: e.start,
      score: e.score,
      verdict: e.verdict,
      truth: clip ? `fish at ${clip.fishInView.map((w) => `${w.start_s.toFixed(0)}-${w.end_s.toFixed(0)} s`).join(', ')}` : t ? (t.animal ? `ANIMAL (${t.category})` : t.category) : '?',
      windows: e.windows.map((w) => `${w.start_s}-${w.end_s} s`).join(', '),
    };
  }),
);
const animals = report.events.filter((e) => byFirst.get(e.files[0])?.animal);
console.log(`\n${formatSummary(summary)}`);
console.log(`Animal triggers in the scenario: ${animals.length}; called likely-blank: ${animals.filter((e) => e.verdict === 'likely-blank').length}.`);
console.log(`\nThe result is in ${shown}. Next, review it in the app (keyboard-driven; ? lists the keys):\n\n  npm start -- ${shown}\n\nor print it: npx movesift report ${shown}`);
