/**
 * Flow features of a blob and of a track: how fast its pixels move (mean magnitude), whether
 * they move together (direction coherence = |mean vector| / mean magnitude: 1 for a body in
 * travel, near 0 for flicker and shimmer), and whether the motion turns back between frames
 * (reversal: share of consecutive frame pairs whose mean vectors point against each other, the
 * signature of a swaying branch or kelp frond).
 */
import type { FloatImage } from '../frame.js';
import type { Track } from '../tracks.js';

export interface BlobFlow {
  magnitude: number;
  coherence: number;
  vx: number;
  vy: number;
}

export function blobFlow(flow: FloatImage, labels: Int32Array, label: number, box: { x: number; y: number; width: number; height: number }): BlobFlow {
  let sx = 0, sy = 0, sm = 0, n = 0;
  const w = flow.width;
  for (let y = box.y; y < box.y + box.height; y++) {
    for (let x = box.x; x < box.x + box.width; x++) {
      const i = y * w + x;
      if (labels[i] !== label) continue;
      const fx = flow.data[i * 2], fy = flow.data[i * 2 + 1];
      sx += fx;
      sy += fy;
      sm += Math.hypot(fx, fy);
      n++;
    }
  }
  if (n === 0) return { magnitude: 0, coherence: 0, vx: 0, vy: 0 };
  const vx = sx / n, vy = sy / n;
  return { magnitude: sm / n, coherence: sm > 0 ? Math.hypot(vx, vy) / (sm / n) : 0, vx, vy };
}

export interface TrackFlow {
  meanMagnitude: number;
  meanCoherence: number;
  reversal: number;
}

/** `perPoint[i]` is the blob flow of track.points[i] (from the flow into that point's frame). */
export function trackFlow(track: Track, perPoint: readonly BlobFlow[]): TrackFlow {
  const n = perPoint.length;
  if (n === 0) return { meanMagnitude: 0, meanCoherence: 0, reversal: 0 };
  let turns = 0;
  for (let i = 1; i < n; i++) {
    const a = perPoint[i - 1], b = perPoint[i];
    if (a.vx * b.vx + a.vy * b.vy < 0) turns++;
  }
  return {
    meanMagnitude: perPoint.reduce((s, p) => s + p.magnitude, 0) / n,
    meanCoherence: perPoint.reduce((s, p) => s + p.coherence, 0) / n,
    reversal: n > 1 ? turns / (n - 1) : 0,
  };
}
