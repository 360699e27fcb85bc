/**
 * A deployment background: what the camera sees with nobody there, built from other triggers of
 * the same camera (the caller passes a middle frame of each). A burst's own median absorbs a
 * subject that stands still through the whole burst; this reference does not.
 *
 * Other triggers differ from this one in more than the subject: the light (minutes or hours
 * apart), a nudged camera, a visitor of their own. So each neighbour is first brought onto the
 * reference frame: aligned by phase correlation (kept only where it makes the frames agree
 * better), then mapped by a robust per-channel gain and offset. Its disagreement with the
 * reference is the median absolute luma difference over valid pixels. A neighbour that
 * disagrees far more than the trigger's own frames do with each other (other light mode,
 * camera moved, a scene that changed) is dropped. It is judged after a smooth relighting too,
 * so that a neighbour under another cloud shadow is not taken for another scene; but the
 * median is built from the neighbours as the gain fit left them, not relit: a field smooth
 * enough to follow a shadow can also follow a large, low-contrast animal in the reference and
 * paint it into the background (a single image's only cue). The background is the clean plate
 * of the kept neighbours (clean-plate.ts): a per-pixel median that leaves out, per neighbour,
 * the pixels where that trigger's own two frames showed something move (when a second frame of
 * it is given), so visitors that stood at the same place in half the neighbours or more (a trail,
 * a bait station) leave no ghost; without second frames it is the plain median, which removes a
 * visitor in fewer than half of them.
 *
 * Output: uint8 RGB like the inputs, plus the valid mask (0 where a shift left no data) and a
 * record of each neighbour's fit.
 */
import { invalidArgument } from '../shared/errors.js';
import { checkInteger, checkNumber } from '../shared/validate.js';
import { checkFrame, checkSameShape, type GreyFrame, type RgbFrame } from './frame.js';
import { medianAbsLumaDiff, toLuma } from './luma.js';
import { estimateShift, shiftReference, worthCompensating, type Shift, type ShiftReference } from './phase-correlate.js';
import { applyGainOffset, fitGainOffset } from './photometric.js';
import { relightMeasured } from './shading.js';
import { calmMarks, cleanPlate, triggerForeground } from './clean-plate.js';
import { andValidity, translateBilinear, translateValidity } from './translate.js';

export interface NeighbourFit {
  shift: Shift;
  compensated: boolean;
  /** Median absolute luma difference to the reference after alignment and gain (grey levels). */
  disagreement: number;
  /** The same after the light is also allowed to fall differently over the frame (a smooth
   *  relighting field, shading.ts relightMeasured): a neighbour taken under another cloud
   *  shadow shows the same place, only lit otherwise. What the neighbour is judged by; equal
   *  to `disagreement` where relighting did not help. */
  relitDisagreement: number;
  kept: boolean;
}

export interface DeploymentBackground {
  /** Absent when fewer than `minKept` neighbours passed. */
  frame?: RgbFrame;
  /** 255 where every shifted neighbour had data (and the mask allows); undefined when none was shifted. */
  valid?: Uint8Array;
  fits: NeighbourFit[];
  /** Share of the frame where visitors in half the kept neighbours or more were left out. */
  replacedShare?: number;
}

export interface DeploymentOptions {
  /** 255 = compare, 0 = ignore (data strip, drawn regions). */
  mask?: GreyFrame;
  /** How much the trigger's own frames disagree with each other (same measure): the yardstick
   *  a neighbour is judged by. Absent (a single image), the best neighbour is the yardstick. */
  ownDisagreement?: number;
  /** Fewest neighbours that must pass to build a background at all. A burst needs 3: the median
   *  of 2 is their mean and keeps half of a visitor either holds. */
  minKept?: number;
  /** Phase-correlation confidence below which a shift is not compensated. */
  alignMinConfidence?: number;
  /** A prepared reference (see shiftReference), when the caller has one already. */
  referenceSpectrum?: ShiftReference;
  /** Per neighbour, another frame of the same trigger (or undefined for a single image): where
   *  the two differ, that trigger had a visitor, and the clean plate leaves it out there. */
  partners?: readonly (RgbFrame | undefined)[];
}

/**
 * A neighbour is kept while it disagrees no more than twice the yardstick plus one grey level.
 * Twice: the median absolute difference of two frames grows with their noise, and a neighbour
 * of the same camera and light mode is expected within a factor of two of the trigger's own
 * frame-to-frame level (our choice, not fitted). The grey level covers 8-bit rounding on very
 * clean frames, where the yardstick is near zero.
 */
const TOLERANCE_FACTOR = 2;
const TOLERANCE_LEVELS = 1;

export function deploymentBackground(reference: RgbFrame, neighbours: readonly RgbFrame[], options: DeploymentOptions = {}): DeploymentBackground {
  checkFrame('reference', reference, 3);
  if (!Array.isArray(neighbours)) throw invalidArgument('neighbours', 'array of frames', neighbours);
  neighbours.forEach((f, i) => {
    checkFrame(`neighbours[${i}]`, f, 3);
    checkSameShape('reference', reference, `neighbours[${i}]`, f);
  });
  if (options.mask) checkSameShape('reference', { ...reference, channels: 1 }, 'mask', options.mask);
  const partners = options.partners ?? [];
  if (partners.length > neighbours.length) throw invalidArgument('partners.length', `at most ${neighbours.length}`, partners.length);
  partners.forEach((f, i) => {
    if (!f) return;
    checkFrame(`partners[${i}]`, f, 3);
    checkSameShape('reference', reference, `partners[${i}]`, f);
  });
  const minKept = options.minKept ?? 1;
  checkInteger('minKept', minKept, 1, 1000);
  const minConfidence = options.alignMinConfidence ?? 0.15;
  checkNumber('alignMinConfidence', minConfidence, 0, 1);
  if (options.ownDisagreement !== undefined) checkNumber('ownDisagreement', options.ownDisagreement, 0, 255);

  const mask = options.mask?.data;
  const refLuma = toLuma(reference);
  const spectrum = options.referenceSpectrum ?? shiftReference(refLuma);
  const onReference = (frame: RgbFrame, valid: Uint8Array | undefined) => {
    const normalised = applyGainOffset(frame, fitGainOffset(reference, frame, valid));
    return { normalised, disagreement: medianAbsLumaDiff(refLuma, toLuma(normalised), valid) };
  };
  const fitted = neighbours.map((nb, i) => {
    const shift = estimateShift(spectrum, toLuma(nb));
    let valid: Uint8Array | undefined = mask;
    let compensated = false;
    let aligned = nb;
    let best = onReference(nb, mask);
    if (worthCompensating(shift, minConfidence)) {
      const t = translateBilinear(nb, shift.dx, shift.dy);
      // The neighbour's own ignored regions (its data strip) move with it.
      const tValid = andValidity(mask, translateValidity(reference.width, reference.height, shift.dx, shift.dy, mask));
      // A shift is kept only if it makes the frames agree better where most pixels are (after
      // the gain fit: a neighbour's exposure differs far more than a burst frame's): otherwise
      // it was pulled by something that moved, not by the camera.
      const moved = onReference(t.frame, tValid);
      if (moved.disagreement < 0.9 * best.disagreement) {
        best = moved;
        aligned = t.frame;
        valid = tValid;
        compensated = true;
      }
    }
    // Relit from the aligned frame, not the gain-fitted one: one gain over a half-shadowed frame
    // clips its sunlit half at 255, and what was clipped cannot be relit.
    const lit = relightMeasured(refLuma, aligned, valid);
    const relit = lit.spread === 0 ? best.disagreement : Math.min(best.disagreement, onReference(lit.frame, valid).disagreement);
    const partner = partners[i];
    return { frame: nb, normalised: best.normalised, valid, partner, fit: { shift, compensated, disagreement: best.disagreement, relitDisagreement: relit, kept: false } as NeighbourFit };
  });
  const yardstick = options.ownDisagreement ?? Math.min(255, ...fitted.map((f) => f.fit.relitDisagreement));
  const limit = TOLERANCE_FACTOR * yardstick + TOLERANCE_LEVELS;
  const kept = fitted.filter((f) => f.fit.relitDisagreement <= limit);
  for (const f of kept) f.fit.kept = true;
  const fits = fitted.map((f) => f.fit);
  if (kept.length < minKept || kept.length === 0) return { fits };
  let valid: Uint8Array | undefined;
  for (const f of kept) if (f.fit.compensated && f.valid) valid = andValidity(valid, f.valid);
  // Each kept trigger's foreground, found in its own frames and moved as it was moved. Only for
  // kept ones: a dropped neighbour's two frames are never compared.
  const foreground = calmMarks(kept.map((f) => (f.partner ? triggerForeground(f.frame, f.partner, { mask }) : undefined))).map((marks, k) => {
    const f = kept[k];
    if (!marks || !f.fit.compensated) return marks;
    const moved = translateBilinear({ width: reference.width, height: reference.height, channels: 1, data: marks }, f.fit.shift.dx, f.fit.shift.dy).frame.data;
    for (let p = 0; p < moved.length; p++) if (moved[p]) moved[p] = 255; // any share of a marked pixel
    return moved;
  });
  const plate = cleanPlate(kept.map((f) => f.normalised), foreground);
  return { frame: plate.frame, valid, fits, replacedShare: plate.replaced / (reference.width * reference.height) };
}
