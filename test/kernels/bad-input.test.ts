/** Bad input to the public kernel entries: typed errors with stable codes, messages naming the parameter. */
import { describe, expect, it } from 'vitest';
import { analyseEvent } from '../../src/kernels/analyse-event.js';
import { absDiff } from '../../src/kernels/abs-diff.js';
import { downscaleArea, analysisSize } from '../../src/kernels/downscale.js';
import { makeGrey, makeRgb } from '../../src/kernels/frame.js';
import { thresholdBinary } from '../../src/kernels/threshold.js';
import { labelComponents } from '../../src/kernels/components.js';
import { ErrorCode, MovesiftError } from '../../src/shared/errors.js';

function codeOf(fn: () => unknown): string {
  try {
    fn();
  } catch (e) {
    if (e instanceof MovesiftError) return `${e.code}: ${e.message}`;
    throw e;
  }
  return 'no error';
}

describe('bad input', () => {
  it('mismatched sizes', () => {
    expect(codeOf(() => absDiff(makeRgb(4, 4), makeRgb(4, 5)))).toMatch(new RegExp(`^${ErrorCode.sizeMismatch}: b: wanted 4x4x3`));
    expect(codeOf(() => analyseEvent({ frames: [makeRgb(8, 8), makeRgb(8, 9)] }))).toMatch(new RegExp(`^${ErrorCode.sizeMismatch}: frames\\[1\\]`));
    expect(codeOf(() => labelComponents(makeGrey(4, 4), makeGrey(5, 4)))).toMatch(new RegExp(`^${ErrorCode.sizeMismatch}: change`));
    expect(codeOf(() => analyseEvent({ frames: [makeRgb(8, 8)], background: makeRgb(4, 4) }))).toMatch(/background/);
  });
  it('a buffer shorter than its declared shape', () => {
    expect(codeOf(() => absDiff({ width: 4, height: 4, channels: 3, data: new Uint8Array(10) }, makeRgb(4, 4)))).toMatch(/a.data.length: wanted 48/);
  });
  it('empty frames and empty lists', () => {
    expect(codeOf(() => thresholdBinary(makeGrey(0, 3), 10))).toMatch(new RegExp(`^${ErrorCode.emptyFrame}: src`));
    expect(codeOf(() => analyseEvent({ frames: [] }))).toMatch(new RegExp(`^${ErrorCode.notEnoughFrames}: frames: wanted at least 1`));
  });
  it('NaN and out-of-range parameters name the parameter', () => {
    expect(codeOf(() => thresholdBinary(makeGrey(2, 2), 300))).toBe(`${ErrorCode.invalidArgument}: thresh: wanted number -1-255, got 300`);
    expect(codeOf(() => analyseEvent({ frames: [makeRgb(8, 8)], params: { seedSigmas: Number.NaN } }))).toBe(
      `${ErrorCode.invalidArgument}: seedSigmas: wanted number 0.5-25, got NaN`,
    );
    expect(codeOf(() => analyseEvent({ frames: [makeRgb(8, 8)], params: { growSigmas: 9 } }))).toMatch(/growSigmas: wanted number 0.5-4/);
    expect(codeOf(() => downscaleArea(makeRgb(10, 10), 20, 5))).toMatch(/outWidth: wanted integer 1-10, got 20/);
    expect(codeOf(() => analysisSize(100, 100, 3.5))).toMatch(/targetWidth: wanted integer/);
  });
});
