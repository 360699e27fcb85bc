/**
 * Training loop of the change classifier: mini-batches drawn with both classes weighted equally
 * (subject crops are the rarer), augmented on the fly (a mirror image, the colour channels
 * permuted alike in all three plane groups, a little noise), Adam with a cosine-decayed rate.
 */
import { CROP_CHANNELS } from '../../src/classifier/crops.js';
import { makeRng } from '../scenes/random.js';
import type { CropSet } from './crop-data.js';
import { adamStep, forward, initNet, lossAndGrad, makeAdam, type Net, type NetShape } from './net.js';

export interface TrainLog {
  epoch: number;
  loss: number;
  seconds: number;
}

const PERMS = [[0, 1, 2], [0, 2, 1], [1, 0, 2], [1, 2, 0], [2, 0, 1], [2, 1, 0]];

export function trainNet(set: CropSet, shape: NetShape, o: { epochs: number; seed: number; batch?: number; lr?: number; decay?: number; onEpoch?: (l: TrainLog) => void }): Net {
  const rng = makeRng(o.seed);
  const net = initNet(shape, rng);
  const opt = makeAdam(net.p);
  const B = o.batch ?? 32;
  const lr0 = o.lr ?? 2e-3;
  const S = shape.size, P = S * S, per = CROP_CHANNELS.length * P;
  const n = set.labels.length;
  const pos = set.labels.reduce((a, b) => a + b, 0);
  // Each class carries half the loss whatever its count.
  const w = [n / (2 * Math.max(1, n - pos)), n / (2 * Math.max(1, pos))];
  const steps = Math.ceil(n / B) * o.epochs;
  const x = new Float32Array(B * per);
  const labels = new Array<number>(B), weights = new Array<number>(B);
  let step = 0;
  for (let epoch = 1; epoch <= o.epochs; epoch++) {
    const started = Date.now();
    const order = Array.from({ length: n }, (_, i) => i);
    for (let i = n - 1; i > 0; i--) {
      const j = rng.int(0, i);
      [order[i], order[j]] = [order[j], order[i]];
    }
    let lossSum = 0, batches = 0;
    for (let at = 0; at + B <= n; at += B) {
      for (let b = 0; b < B; b++) {
        const src = order[at + b];
        const flip = rng.chance(0.5);
        const perm = PERMS[rng.int(0, 5)];
        const noise = rng.range(0, 0.15);
        for (let c = 0; c < CROP_CHANNELS.length; c++) {
          const group = Math.floor(c / 3) * 3;
          const from = group + perm[c - group];
          const so = src * per + from * P, dO = b * per + c * P;
          for (let yy = 0; yy < S; yy++) {
            for (let xx = 0; xx < S; xx++) {
              const v = set.crops[so + yy * S + (flip ? S - 1 - xx : xx)];
              x[dO + yy * S + xx] = v + (noise ? noise * (rng.next() - 0.5) * 2 : 0);
            }
          }
        }
        labels[b] = set.labels[src];
        weights[b] = w[set.labels[src]];
      }
      const lr = lr0 * 0.5 * (1 + Math.cos((Math.PI * step) / steps));
      const r = lossAndGrad(net, x, labels, weights, B);
      adamStep(net, r.grad, opt, lr, o.decay ?? 1e-4);
      lossSum += r.loss;
      batches++;
      step++;
    }
    o.onEpoch?.({ epoch, loss: lossSum / Math.max(1, batches), seconds: (Date.now() - started) / 1000 });
  }
  return net;
}

/** P(subject) of every crop of a set. */
export function predict(net: Net, crops: Float32Array, count: number): Float32Array {
  const per = CROP_CHANNELS.length * net.shape.size ** 2;
  const out = new Float32Array(count);
  for (let at = 0; at < count; at += 64) {
    const b = Math.min(64, count - at);
    const f = forward(net, crops.subarray(at * per, (at + b) * per), b);
    for (let i = 0; i < b; i++) out[at + i] = f.probs[i * 2 + 1];
  }
  return out;
}

/** Per event: the most subject-like of its crops (0 for an event with no track). */
export function eventProbabilities(set: CropSet, probs: Float32Array): number[] {
  return set.events.map((e) => e.crops.reduce((m, c) => Math.max(m, probs[c]), 0));
}
