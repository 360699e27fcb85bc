/**
 * The data strip of each deployment by consensus (src/kernels/data-strip.ts,
 * detectDataStripConsensus): the middle frames of up to `SAMPLE` image events spread evenly over
 * the deployment, decoded at the analysis size, before any event is analysed. Each event then
 * ignores the wider of its own strip and its deployment's, so a strip whose text defeats the
 * per-frame test is still ignored in every trigger. A deployment with fewer than
 * MIN_CONSENSUS_FRAMES decodable image events has no consensus and the scan says so.
 */
import { detectDataStripConsensus, MIN_CONSENSUS_FRAMES, type DataStrip } from '../kernels/data-strip.js';
import type { RgbFrame } from '../kernels/frame.js';
import { decodeImage } from '../media/decode-image.js';

/** Events sampled per deployment: enough for a median that no one trigger's picture decides,
 *  few enough that a rescan of a large card pays little for it (one small decode each). */
export const SAMPLE = 24;

export interface StripSample {
  abs: string;
  display: string;
  width: number;
  height: number;
}

export interface DeploymentStrip {
  strip?: DataStrip;
  /** Frames the consensus was taken over (0 when there were too few). */
  frames: number;
}

/** `candidates`: the middle file of each image event of one deployment, in capture order. */
export async function deploymentStrip(candidates: readonly StripSample[]): Promise<DeploymentStrip> {
  if (candidates.length < MIN_CONSENSUS_FRAMES) return { frames: 0 };
  // The commonest analysis size (a deployment is one camera; a stray resized file is left out).
  const sizes = new Map<string, StripSample[]>();
  for (const c of candidates) {
    const k = `${c.width}x${c.height}`;
    const list = sizes.get(k);
    if (list) list.push(c);
    else sizes.set(k, [c]);
  }
  const same = [...sizes.values()].sort((a, b) => b.length - a.length)[0];
  const count = Math.min(SAMPLE, same.length);
  const frames: RgbFrame[] = [];
  for (let k = 0; k < count; k++) {
    const c = same[Math.floor((k * same.length) / count)];
    try {
      frames.push(await decodeImage(c.abs, c.display, c.width, c.height));
    } catch {
      // A file that cannot be decoded is its own event's error, recorded when that event runs.
    }
  }
  if (frames.length < MIN_CONSENSUS_FRAMES) return { frames: 0 };
  return { strip: detectDataStripConsensus(frames), frames: frames.length };
}
