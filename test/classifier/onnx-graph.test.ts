/**
 * onnxruntime-node runs graphs written by src/classifier/onnx-graph.ts, checked against
 * computations made outside the project:
 * - a fixed 3x3 convolution (zero padding) against OpenCV's filter2D (npm @techstark/opencv-js;
 *   filter2D correlates without flipping the kernel, as ONNX's Conv does: OpenCV documentation
 *   of filter2D, ONNX operator documentation of Conv), then a softmax over channels written
 *   from its definition;
 * - the change classifier's network exported from the training arithmetic
 *   (tools/classifier/net.ts): onnxruntime's outputs equal the training code's within 1e-4.
 */
import * as ort from 'onnxruntime-node';
import { beforeAll, describe, expect, it } from 'vitest';
import { writeOnnx } from '../../src/classifier/onnx-graph.js';
import { forward, initNet, toLayers } from '../../tools/classifier/net.js';
import { makeRng } from '../../tools/scenes/random.js';
import { loadOpenCv, type Cv } from '../helpers/opencv.js';

let cv: Cv;
beforeAll(async () => {
  cv = await loadOpenCv();
});

const run = async (bytes: Uint8Array, input: string, data: Float32Array, dims: number[], output: string) => {
  const s = await ort.InferenceSession.create(bytes);
  const out = await s.run({ [input]: new ort.Tensor('float32', data, dims) });
  await s.release();
  return out[output];
};

describe('a hand-built graph', () => {
  it('a fixed convolution and a softmax equal OpenCV filter2D and the softmax formula', async () => {
    const H = 7, W = 9;
    const rng = makeRng(5);
    const img = Float32Array.from({ length: H * W }, () => Math.round(rng.range(-50, 50)) / 10);
    // Two output channels: a Sobel-x kernel and a blur, with biases.
    const k1 = [-1, 0, 1, -2, 0, 2, -1, 0, 1];
    const k2 = [1, 2, 1, 2, 4, 2, 1, 2, 1].map((v) => v / 16);
    const bias = [0.5, -0.25];
    const bytes = writeOnnx({
      name: 'hand', inputName: 'x', inputShape: ['N', 1, H, W], outputName: 'y', outputShape: ['N', 2, H, W],
      layers: [{ op: 'conv', weights: Float32Array.from([...k1, ...k2]), bias: Float32Array.from(bias), out: 2, in: 1, kernel: 3, pad: 1 }, { op: 'softmax' }],
    });
    // Softmax over axis 1 of [N, C, H, W] in opset 13 is over channels, per pixel.
    const y = await run(bytes, 'x', img, [1, 1, H, W], 'y');
    expect(y.dims).toEqual([1, 2, H, W]);
    const src = cv.matFromArray(H, W, cv.CV_32F, Array.from(img));
    const conv = [k1, k2].map((k, c) => {
      const ker = cv.matFromArray(3, 3, cv.CV_32F, k);
      const dst = new cv.Mat();
      cv.filter2D(src, dst, cv.CV_32F, ker, new cv.Point(-1, -1), bias[c], cv.BORDER_CONSTANT);
      const v = Float32Array.from(dst.data32F);
      ker.delete();
      dst.delete();
      return v;
    });
    src.delete();
    const got = y.data as Float32Array;
    let worst = 0;
    for (let i = 0; i < H * W; i++) {
      const e1 = Math.exp(conv[0][i]), e2 = Math.exp(conv[1][i]);
      worst = Math.max(worst, Math.abs(got[i] - e1 / (e1 + e2)), Math.abs(got[H * W + i] - e2 / (e1 + e2)));
    }
    expect(worst).toBeLessThan(1e-6);
    // Not a constant: the two channels really differ across the image.
    expect(Math.max(...got.slice(0, H * W)) - Math.min(...got.slice(0, H * W))).toBeGreaterThan(0.5);
  });

  it('max pooling, flatten, a dense layer and a sigmoid follow their definitions', async () => {
    const x = Float32Array.from([1, -2, 3, 0.5, 4, 8, -1, 2, 0, 0, -3, -4, 5, 6, 7, 9]); // [1, 1, 4, 4]
    const w = Float32Array.from([0.5, -1, 2, 0.25]);
    // z = 14.25 would saturate the sigmoid; a bias of -13 keeps it where a wrong input shows.
    const bytes = writeOnnx({
      name: 'pool', inputName: 'x', inputShape: ['N', 1, 4, 4], outputName: 'y', outputShape: ['N', 1],
      layers: [{ op: 'maxpool2' }, { op: 'flatten' }, { op: 'dense', weights: w, bias: Float32Array.from([-13]), out: 1, in: 4 }, { op: 'sigmoid' }],
    });
    const y = await run(bytes, 'x', x, [1, 1, 4, 4], 'y');
    // Rows [1 -2 3 .5] [4 8 -1 2] [0 0 -3 -4] [5 6 7 9]; 2x2 maxima by hand: 8, 3, 6, 9.
    const z = 0.5 * 8 - 1 * 3 + 2 * 6 + 0.25 * 9 - 13;
    expect((y.data as Float32Array)[0]).toBeCloseTo(1 / (1 + Math.exp(-z)), 6);
  });
});

describe('the change classifier exported', () => {
  it("onnxruntime's probabilities equal the training arithmetic's within 1e-4", async () => {
    const rng = makeRng(11);
    const net = initNet({ channels: 9, size: 32, convs: [12, 24, 32], hidden: 32, classes: 2 }, rng);
    const batch = 5;
    const x = Float32Array.from({ length: batch * 9 * 32 * 32 }, () => rng.range(-3, 3));
    const mine = forward(net, x, batch).probs;
    const bytes = writeOnnx({ name: 'net', inputName: 'crops', inputShape: ['N', 9, 32, 32], outputName: 'p', outputShape: ['N', 2], layers: toLayers(net) });
    const y = (await run(bytes, 'crops', x, [batch, 9, 32, 32], 'p')).data as Float32Array;
    let worst = 0;
    for (let i = 0; i < mine.length; i++) worst = Math.max(worst, Math.abs(mine[i] - y[i]));
    expect(worst).toBeLessThan(1e-4);
    // The inputs are not all judged alike (the comparison is not between two constants).
    expect(Math.max(...mine.filter((_, i) => i % 2)) - Math.min(...mine.filter((_, i) => i % 2))).toBeGreaterThan(1e-3);
  });
});
