/** Flow features of blobs and tracks on flow fields with known motion. */
import { describe, expect, it } from 'vitest';
import { blobFlow, trackFlow } from '../../src/kernels/flow/flow-features.js';
import type { Blob } from '../../src/kernels/components.js';
import { analyseEvent } from '../../src/kernels/analyse-event.js';
import { renderScene } from '../../tools/scenes/render.js';
import { Category } from '../../tools/scenes/categories.js';

const box = { x: 0, y: 0, width: 4, height: 4 };

describe('flow features', () => {
  it('a uniform translation is coherent; opposed halves are not', () => {
    const labels = new Int32Array(16).fill(1);
    const same = { width: 4, height: 4, channels: 2, data: new Float32Array(32).map((_, i) => (i % 2 ? 0 : 2)) };
    const f = blobFlow(same, labels, 1, box);
    expect(f.magnitude).toBeCloseTo(2, 5);
    expect(f.coherence).toBeCloseTo(1, 5);
    const opposed = { ...same, data: new Float32Array(32).map((_, i) => (i % 2 ? 0 : i < 16 ? 2 : -2)) };
    expect(blobFlow(opposed, labels, 1, box).coherence).toBeCloseTo(0, 5);
  });
  it('back-and-forth motion reads as reversal, steady travel does not', () => {
    const blob = { label: 1 } as Blob;
    const track = { id: 1, points: [0, 1, 2, 3].map((frame) => ({ frame, blob })) };
    const sway = [1, -1, 1, -1].map((vx) => ({ magnitude: 1, coherence: 1, vx, vy: 0 }));
    const walk = [1, 1.2, 0.9, 1].map((vx) => ({ magnitude: vx, coherence: 1, vx, vy: 0.1 }));
    expect(trackFlow(track, sway).reversal).toBe(1);
    expect(trackFlow(track, walk).reversal).toBe(0);
  });
  it('analyseEvent with flow reports per-track flow for a crossing animal', () => {
    const s = renderScene({ seed: 31, category: Category.animalCrossing, width: 192, height: 108, frames: 4 });
    const a = analyseEvent({ frames: s.frames, flow: true });
    expect(a.trackFlows).toHaveLength(a.tracks.length);
    // The animal's track: the one holding the most changed pixels (a few specks of noise may
    // chain across the frames too, so the longest is not always it).
    const size = (t: (typeof a.tracks)[number]) => t.points.reduce((q, p) => q + p.blob.area, 0);
    const animal = a.tracks.reduce((best, t, i) => (size(t) > size(a.tracks[best]) ? i : best), 0);
    expect(a.tracks[animal].points).toHaveLength(4);
    expect(a.trackFlows![animal].meanMagnitude).toBeGreaterThan(0.5);
  });
});
