/**
 * Blob tracks across the frames of one event, and the features that tell a subject's travel
 * from the back-and-forth of a swaying branch.
 *
 * Linking is greedy nearest-neighbour with a gate: a blob joins the track that ended in the
 * previous frame (or one frame before, to bridge a missed detection) whose last blob overlaps
 * its box or whose centroid is within `gate` (a fraction of the frame diagonal, or two blob
 * sizes), and whose area is within a factor of four of its own (a body changes shape, but
 * not that much between frames; rain streaks and specks do not chain into one "animal").
 * Candidates are taken best first by distance; each track and blob is used once per frame. Simple on purpose: bursts hold few frames and few subjects.
 */
import { checkNumber } from '../shared/validate.js';
import type { Blob } from './components.js';
import { median } from './select.js';

export interface TrackPoint {
  frame: number;
  blob: Blob;
}

export interface Track {
  id: number;
  points: TrackPoint[];
}

export interface TrackFeatures {
  /** Frames with a blob of this track / frames in the event. */
  persistence: number;
  /** Net displacement / path length, 0..1; 0 for fewer than three points. */
  straightness: number;
  /** Net displacement in body sizes (sqrt of median area). */
  travel: number;
  /** Coefficient of variation of the area. */
  sizeVariation: number;
  /** Median area as a fraction of the frame. */
  areaFraction: number;
  /** Mean and peak change of the track's blobs, in noise sigmas. */
  meanSnr: number;
  peakSnr: number;
  /** Mean fill of the blob's box (area / box area). */
  fill: number;
  /** Mean share of the blobs' pixels the scene cannot explain by a small shift or a light change. */
  unexplained: number;
  /** Mean sharpness of the blobs' outlines (edge-contrast.ts). */
  edge: number;
}

function boxesTouch(a: Blob, b: Blob): boolean {
  return a.x <= b.x + b.width && b.x <= a.x + a.width && a.y <= b.y + b.height && b.y <= a.y + a.height;
}

export function linkTracks(blobsPerFrame: readonly Blob[][], width: number, height: number, gate = 0.12): Track[] {
  checkNumber('gate', gate, 0, 1);
  const diag = Math.hypot(width, height);
  const tracks: Track[] = [];
  for (let f = 0; f < blobsPerFrame.length; f++) {
    const blobs = blobsPerFrame[f];
    const open = tracks.filter((t) => t.points[t.points.length - 1].frame >= f - 2);
    const pairs: Array<{ t: Track; b: number; d: number }> = [];
    for (const t of open) {
      const last = t.points[t.points.length - 1].blob;
      blobs.forEach((b, i) => {
        const d = Math.hypot(b.cx - last.cx, b.cy - last.cy);
        const size = 2 * Math.sqrt(Math.max(b.area, last.area));
        const ratio = b.area > last.area ? b.area / last.area : last.area / b.area;
        if (ratio <= 4 && (boxesTouch(b, last) || d <= Math.max(gate * diag, size))) pairs.push({ t, b: i, d });
      });
    }
    pairs.sort((p, q) => p.d - q.d);
    const usedT = new Set<Track>();
    const usedB = new Set<number>();
    for (const p of pairs) {
      if (usedT.has(p.t) || usedB.has(p.b)) continue;
      usedT.add(p.t);
      usedB.add(p.b);
      p.t.points.push({ frame: f, blob: blobs[p.b] });
    }
    blobs.forEach((b, i) => {
      if (!usedB.has(i)) tracks.push({ id: tracks.length + 1, points: [{ frame: f, blob: b }] });
    });
  }
  return tracks;
}


/** `snrScale`: the factor by which blob change values exceed sigmas (the SNR image's scale). */
export function trackFeatures(track: Track, frameCount: number, width: number, height: number, snrScale: number): TrackFeatures {
  const pts = track.points;
  const areas = pts.map((p) => p.blob.area);
  const medArea = median(areas);
  const meanArea = areas.reduce((a, b) => a + b, 0) / areas.length;
  const sd = Math.sqrt(areas.reduce((a, b) => a + (b - meanArea) ** 2, 0) / areas.length);
  let path = 0;
  for (let i = 1; i < pts.length; i++) path += Math.hypot(pts[i].blob.cx - pts[i - 1].blob.cx, pts[i].blob.cy - pts[i - 1].blob.cy);
  const net = pts.length > 1 ? Math.hypot(pts[pts.length - 1].blob.cx - pts[0].blob.cx, pts[pts.length - 1].blob.cy - pts[0].blob.cy) : 0;
  return {
    persistence: new Set(pts.map((p) => p.frame)).size / Math.max(1, frameCount),
    straightness: pts.length >= 3 && path > 0 ? net / path : 0,
    travel: net / Math.sqrt(Math.max(1, medArea)),
    sizeVariation: meanArea > 0 ? sd / meanArea : 0,
    areaFraction: medArea / (width * height),
    meanSnr: pts.reduce((a, p) => a + p.blob.meanChange, 0) / pts.length / snrScale,
    peakSnr: Math.max(...pts.map((p) => p.blob.peakChange)) / snrScale,
    fill: pts.reduce((a, p) => a + p.blob.area / (p.blob.width * p.blob.height), 0) / pts.length,
    unexplained: pts.reduce((a, p) => a + (p.blob.unexplained ?? 1), 0) / pts.length,
    edge: pts.reduce((a, p) => a + (p.blob.edge ?? 1), 0) / pts.length,
  };
}
