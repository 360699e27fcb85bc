/**
 * Real data: the night infrared burst in ../shared/fixtures/real-ir-burst (MICA project,
 * Camtrap DP 1.0.2 example dataset, CC-BY 4.0; see SOURCES.md). Ground truth from the source's
 * observations table: every frame shows an animal (a heron). The camera's data strip at top
 * and bottom changes every frame.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { analyseEvent, type EventAnalysis } from '../../src/kernels/analyse-event.js';
import { detectDataStripInFrames, ignoreMask } from '../../src/kernels/data-strip.js';
import type { RgbFrame } from '../../src/kernels/frame.js';
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { scoreEvent, Verdict } from '../../src/kernels/score.js';
import { IR_BURST, readRgb } from '../helpers/fixtures.js';

let frames: RgbFrame[];
beforeAll(async () => {
  frames = await Promise.all(IR_BURST.map((f) => readRgb(f, 480)));
});

describe('real infrared burst with an animal standing nearly still', () => {
  it('finds the data strip at top and bottom and nothing deep in the picture', () => {
    const strip = detectDataStripInFrames(frames);
    const h = frames[0].height; // 338 rows at 480 px wide
    // In the source frames the bars are about 32 of 1440 rows (2.2%) at each edge.
    expect(strip.top).toBeGreaterThanOrEqual(Math.floor(0.018 * h));
    expect(strip.top).toBeLessThanOrEqual(Math.ceil(0.04 * h));
    expect(strip.bottom).toBeGreaterThanOrEqual(Math.floor(0.018 * h));
    expect(strip.bottom).toBeLessThanOrEqual(Math.ceil(0.04 * h));
  });

  it('ignores the strip and is not called likely-blank', () => {
    const strip = detectDataStripInFrames(frames);
    const mask = ignoreMask(frames[0].width, frames[0].height, strip);
    const a: EventAnalysis = analyseEvent({ frames, mask });
    for (const f of a.frames) {
      for (const b of f.blobs) {
        expect(b.y).toBeGreaterThanOrEqual(strip.top);
        expect(b.y + b.height).toBeLessThanOrEqual(frames[0].height - strip.bottom);
      }
    }
    const s = scoreEvent(MOTION_MODEL, a);
    console.log(`real IR burst: score ${s.score.toFixed(3)}, verdict ${s.verdict}, tracks ${a.tracks.length}`);
    expect(s.verdict).not.toBe(Verdict.likelyBlank);
    // The best track is the heron: in the lower middle of the frame (x 35-70%, y 60-95% of 1024x720 view).
    const best = a.tracks[s.bestTrack].points[0].blob;
    expect(best.cx / frames[0].width).toBeGreaterThan(0.3);
    expect(best.cx / frames[0].width).toBeLessThan(0.75);
    expect(best.cy / frames[0].height).toBeGreaterThan(0.55);
  });

  it('without the strip mask the changing text itself produces blobs inside the strip', () => {
    const strip = detectDataStripInFrames(frames);
    const a = analyseEvent({ frames });
    const inStrip = a.frames.flatMap((f) => f.blobs).filter((b) => b.y < strip.top || b.y + b.height > frames[0].height - strip.bottom);
    expect(inStrip.length).toBeGreaterThan(0);
  });
});
