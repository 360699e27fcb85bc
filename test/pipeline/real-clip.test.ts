/**
 * A real clip through the real command line: OpenCV's sample `tree.avi` (Debian package
 * opencv-doc 4.6.0, examples/data; Apache-2.0 AND BSD-3-Clause per that package's copyright
 * file), a tree in wind for its whole 29.6 s with a hand entering at the top right at 23.25 s
 * (read off its frames by eye, tools/clip-truth.ts). The clip is read where Debian installs it
 * and never copied into the repository; .ci/run installs the package. Skipped, saying so, where
 * it is not installed.
 */
import { copyFileSync, existsSync } from 'node:fs';
import path from 'node:path';
import { expect, it } from 'vitest';
import { runCli, tempDir } from '../helpers/cli.js';
import { REAL_CLIPS } from '../../tools/clip-truth.js';
import type { Report } from '../../src/pipeline/report.js';

const tree = REAL_CLIPS.find((c) => c.truth.file === 'tree.avi')!;
const reason = existsSync(tree.path) ? '' : `${tree.path} is not installed (${tree.install})`;

it.skipIf(!!reason)(`a tree in wind is not kept whole; the hand that enters is${reason ? ` [skipped: ${reason}]` : ''}`, () => {
  const dir = tempDir();
  copyFileSync(tree.path, path.join(dir, 'tree.avi'));
  const ledger = path.join(tempDir(), 'tree.ledger');
  const scan = runCli(['scan', dir, '--ledger', ledger]);
  expect(scan.code, scan.stderr).toBe(0);
  const report = JSON.parse(runCli(['report', ledger, '--format', 'json']).stdout) as Report;
  const clip = report.events.find((e) => e.files[0] === 'tree.avi')!;
  const hand = tree.truth.subject[0];
  const kept = clip.windows.reduce((s, w) => s + (w.end_s - w.start_s), 0) / tree.truth.durationS;
  console.log(`tree.avi: windows ${JSON.stringify(clip.windows)}; kept ${(100 * kept).toFixed(1)}% of the clip, the hand is in view for ${(100 * (hand.end_s - hand.start_s) / tree.truth.durationS).toFixed(1)}%`);
  expect(clip.verdict).not.toBe('likely-blank');
  expect(clip.windows.some((w) => w.start_s <= hand.end_s && w.end_s >= hand.start_s)).toBe(true);
  // 87% was kept when every one-frame flicker of the leaves counted (before the track-persistence
  // rule and the clip's own seed level); about 50% now. The bar of the screening issue (the
  // subject's share plus 12 points, 34%) is not met yet: this guards what was gained.
  expect(kept).toBeLessThan(0.6);
}, 120_000);
