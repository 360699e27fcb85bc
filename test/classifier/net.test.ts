/**
 * The training arithmetic's backward pass against central finite differences of its own loss
 * (the standard gradient check), and one Adam step lowering the loss on a fixed batch.
 */
import { describe, expect, it } from 'vitest';
import { adamStep, allParams, initNet, lossAndGrad, makeAdam } from '../../tools/classifier/net.js';
import { makeRng } from '../../tools/scenes/random.js';

describe('the network in training', () => {
  const shape = { channels: 2, size: 8, convs: [3, 4], hidden: 5, classes: 2 };
  const rng = makeRng(3);
  const batch = 3;
  const x = Float32Array.from({ length: batch * 2 * 64 }, () => rng.range(-2, 2));
  const labels = [0, 1, 1];
  const weights = [1, 2, 0.5];

  it('gradients agree with finite differences', () => {
    const net = initNet(shape, makeRng(4));
    const { grad } = lossAndGrad(net, x, labels, weights, batch);
    const ps = allParams(net.p), gs = allParams(grad);
    let checked = 0, agree = 0, nonzero = 0;
    const eps = 1e-3;
    ps.forEach((p, k) => {
      for (let i = 0; i < p.length; i += Math.max(1, Math.floor(p.length / 12))) {
        const keep = p[i];
        p[i] = keep + eps;
        const up = lossAndGrad(net, x, labels, weights, batch).loss;
        p[i] = keep - eps;
        const down = lossAndGrad(net, x, labels, weights, batch).loss;
        p[i] = keep;
        const numeric = (up - down) / (2 * eps);
        const analytic = gs[k][i];
        checked++;
        if (Math.abs(analytic) > 1e-4) nonzero++;
        if (Math.abs(numeric - analytic) <= 1e-3 + 2e-2 * Math.abs(numeric)) agree++;
      }
    });
    // A ReLU or a pooling winner can switch inside +-eps; allow one such kink in the sample.
    expect(agree).toBeGreaterThanOrEqual(checked - 1);
    expect(nonzero).toBeGreaterThan(checked / 3);
  });

  it('Adam steps lower the loss', () => {
    const net = initNet(shape, makeRng(6));
    const opt = makeAdam(net.p);
    const first = lossAndGrad(net, x, labels, weights, batch).loss;
    for (let s = 0; s < 30; s++) adamStep(net, lossAndGrad(net, x, labels, weights, batch).grad, opt, 0.01, 0);
    expect(lossAndGrad(net, x, labels, weights, batch).loss).toBeLessThan(0.5 * first);
  });
});
