/**
 * The change classifier's network and its training arithmetic, in plain typed arrays: 3x3
 * convolutions (padding 1) with ReLU and 2x2 max pooling, then dense layers, softmax and
 * cross-entropy; backward passes written by hand and checked against finite differences
 * (test/classifier/net.test.ts); Adam updates (Kingma & Ba 2015, their default betas).
 * Layout NCHW and operator meaning as ONNX's Conv, MaxPool and Gemm, so the exported graph
 * (src/classifier/onnx-graph.ts) computes the same function: the export test compares them.
 *
 * Change together: toLayers (the export) with every layer kind here.
 */
import type { Layer } from '../../src/classifier/onnx-graph.js';
import type { Rng } from '../scenes/random.js';

export interface NetShape {
  channels: number;
  size: number;
  /** Output channels of each conv block (conv 3x3, ReLU, max pool 2x2). */
  convs: number[];
  /** Width of the hidden dense layer. */
  hidden: number;
  classes: number;
}

export interface Params {
  convW: Float32Array[];
  convB: Float32Array[];
  d1W: Float32Array;
  d1B: Float32Array;
  d2W: Float32Array;
  d2B: Float32Array;
}

export interface Net {
  shape: NetShape;
  p: Params;
}

const convIn = (s: NetShape, i: number) => (i === 0 ? s.channels : s.convs[i - 1]);
const sideAt = (s: NetShape, i: number) => s.size >> i;
export const flatSize = (s: NetShape) => s.convs[s.convs.length - 1] * sideAt(s, s.convs.length) ** 2;

/** He-normal initial weights (He et al. 2015: variance 2 / fan-in for ReLU layers). */
export function initNet(shape: NetShape, rng: Rng): Net {
  if (shape.size % (1 << shape.convs.length)) throw new Error(`size ${shape.size} must divide by ${1 << shape.convs.length}`);
  const gauss = () => {
    const u = Math.max(1e-12, rng.next()), v = rng.next();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
  const he = (n: number, fanIn: number) => Float32Array.from({ length: n }, () => gauss() * Math.sqrt(2 / fanIn));
  const convW = shape.convs.map((o, i) => he(o * convIn(shape, i) * 9, convIn(shape, i) * 9));
  const convB = shape.convs.map((o) => new Float32Array(o));
  const f = flatSize(shape);
  return {
    shape,
    p: { convW, convB, d1W: he(shape.hidden * f, f), d1B: new Float32Array(shape.hidden), d2W: he(shape.classes * shape.hidden, shape.hidden), d2B: new Float32Array(shape.classes) },
  };
}

export function paramCount(n: Net): number {
  return allParams(n.p).reduce((a, t) => a + t.length, 0);
}

export function allParams(p: Params): Float32Array[] {
  return [...p.convW, ...p.convB, p.d1W, p.d1B, p.d2W, p.d2B];
}

/** The network as ONNX layers (src/classifier/onnx-graph.ts), ending in softmax. */
export function toLayers(n: Net): Layer[] {
  const s = n.shape;
  const layers: Layer[] = [];
  s.convs.forEach((o, i) => layers.push({ op: 'conv', weights: n.p.convW[i], bias: n.p.convB[i], out: o, in: convIn(s, i), kernel: 3, pad: 1 }, { op: 'relu' }, { op: 'maxpool2' }));
  layers.push({ op: 'flatten' }, { op: 'dense', weights: n.p.d1W, bias: n.p.d1B, out: s.hidden, in: flatSize(s) }, { op: 'relu' });
  layers.push({ op: 'dense', weights: n.p.d2W, bias: n.p.d2B, out: s.classes, in: s.hidden }, { op: 'softmax' });
  return layers;
}

// ---- conv 3x3, padding 1, one sample: x [C, H, W] -> y [O, H, W] ----

function conv3(x: Float32Array, xo: number, C: number, H: number, W: number, w: Float32Array, b: Float32Array, O: number, y: Float32Array, yo: number): void {
  const hw = H * W;
  for (let o = 0; o < O; o++) {
    const yb = yo + o * hw;
    y.fill(b[o], yb, yb + hw);
    for (let c = 0; c < C; c++) {
      const xb = xo + c * hw;
      const wb = (o * C + c) * 9;
      for (let ky = 0; ky < 3; ky++) {
        const dy = ky - 1;
        const y0 = Math.max(0, -dy), y1 = Math.min(H, H - dy);
        for (let kx = 0; kx < 3; kx++) {
          const dx = kx - 1;
          const wv = w[wb + ky * 3 + kx];
          const x0 = Math.max(0, -dx), x1 = Math.min(W, W - dx);
          for (let r = y0; r < y1; r++) {
            const yr = yb + r * W, xr = xb + (r + dy) * W + dx;
            for (let q = x0; q < x1; q++) y[yr + q] += wv * x[xr + q];
          }
        }
      }
    }
  }
}

/** Gradients of conv3 for one sample: dw, db accumulated; dx written (if given). */
function conv3Back(x: Float32Array, xo: number, C: number, H: number, W: number, w: Float32Array, O: number, dy: Float32Array, dyo: number, dw: Float32Array, db: Float32Array, dx: Float32Array | null, dxo: number): void {
  const hw = H * W;
  if (dx) dx.fill(0, dxo, dxo + C * hw);
  for (let o = 0; o < O; o++) {
    const gb = dyo + o * hw;
    let s = 0;
    for (let i = 0; i < hw; i++) s += dy[gb + i];
    db[o] += s;
    for (let c = 0; c < C; c++) {
      const xb = xo + c * hw;
      const wb = (o * C + c) * 9;
      for (let ky = 0; ky < 3; ky++) {
        const ddy = ky - 1;
        const y0 = Math.max(0, -ddy), y1 = Math.min(H, H - ddy);
        for (let kx = 0; kx < 3; kx++) {
          const ddx = kx - 1;
          const x0 = Math.max(0, -ddx), x1 = Math.min(W, W - ddx);
          const wv = w[wb + ky * 3 + kx];
          let g = 0;
          for (let r = y0; r < y1; r++) {
            const yr = gb + r * W, xr = xb + (r + ddy) * W + ddx;
            for (let q = x0; q < x1; q++) g += dy[yr + q] * x[xr + q];
          }
          dw[wb + ky * 3 + kx] += g;
          if (dx) {
            const dxb = dxo + c * hw;
            for (let r = y0; r < y1; r++) {
              const yr = gb + r * W, xr = dxb + (r + ddy) * W + ddx;
              for (let q = x0; q < x1; q++) dx[xr + q] += wv * dy[yr + q];
            }
          }
        }
      }
    }
  }
}

/** ReLU then 2x2 max pool over [C, H, W]; records the winning index per output for backward. */
function reluPool(y: Float32Array, yo: number, C: number, H: number, W: number, out: Float32Array, oo: number, arg: Int32Array, ao: number): void {
  const h2 = H >> 1, w2 = W >> 1;
  for (let c = 0; c < C; c++) {
    for (let r = 0; r < h2; r++) {
      for (let q = 0; q < w2; q++) {
        const base = yo + c * H * W + 2 * r * W + 2 * q;
        let best = base, bv = y[base];
        for (const k of [base + 1, base + W, base + W + 1]) if (y[k] > bv) { bv = y[k]; best = k; }
        const o = c * h2 * w2 + r * w2 + q;
        // max(relu(a), relu(b), ...) = relu(max(a, b, ...)): one ReLU after the pool is the same.
        out[oo + o] = bv > 0 ? bv : 0;
        arg[ao + o] = bv > 0 ? best - yo : -1;
      }
    }
  }
}

export interface Forward {
  batch: number;
  /** Per conv block: its input, its pre-activation output, the pooled winners. */
  ins: Float32Array[];
  pre: Float32Array[];
  arg: Int32Array[];
  flat: Float32Array;
  h1: Float32Array;
  logits: Float32Array;
  probs: Float32Array;
}

export function forward(n: Net, x: Float32Array, batch: number): Forward {
  const s = n.shape;
  const ins: Float32Array[] = [];
  const pre: Float32Array[] = [];
  const arg: Int32Array[] = [];
  let cur = x;
  s.convs.forEach((O, i) => {
    const C = convIn(s, i), side = sideAt(s, i), hw = side * side;
    const y = new Float32Array(batch * O * hw);
    const pooled = new Float32Array(batch * O * (hw >> 2));
    const a = new Int32Array(batch * O * (hw >> 2));
    for (let b = 0; b < batch; b++) {
      conv3(cur, b * C * hw, C, side, side, n.p.convW[i], n.p.convB[i], O, y, b * O * hw);
      reluPool(y, b * O * hw, O, side, side, pooled, b * O * (hw >> 2), a, b * O * (hw >> 2));
    }
    ins.push(cur);
    pre.push(y);
    arg.push(a);
    cur = pooled;
  });
  const F = flatSize(s), Hd = s.hidden, K = s.classes;
  const flat = cur;
  const h1 = new Float32Array(batch * Hd);
  const logits = new Float32Array(batch * K);
  const probs = new Float32Array(batch * K);
  for (let b = 0; b < batch; b++) {
    for (let j = 0; j < Hd; j++) {
      let z = n.p.d1B[j];
      const wb = j * F, xb = b * F;
      for (let i = 0; i < F; i++) z += n.p.d1W[wb + i] * flat[xb + i];
      h1[b * Hd + j] = z > 0 ? z : 0;
    }
    let mx = -Infinity;
    for (let k = 0; k < K; k++) {
      let z = n.p.d2B[k];
      for (let j = 0; j < Hd; j++) z += n.p.d2W[k * Hd + j] * h1[b * Hd + j];
      logits[b * K + k] = z;
      mx = Math.max(mx, z);
    }
    let sum = 0;
    for (let k = 0; k < K; k++) sum += (probs[b * K + k] = Math.exp(logits[b * K + k] - mx));
    for (let k = 0; k < K; k++) probs[b * K + k] /= sum;
  }
  return { batch, ins, pre, arg, flat, h1, logits, probs };
}

export function zeroLike(p: Params): Params {
  const z = (a: Float32Array) => new Float32Array(a.length);
  return { convW: p.convW.map(z), convB: p.convB.map(z), d1W: z(p.d1W), d1B: z(p.d1B), d2W: z(p.d2W), d2B: z(p.d2B) };
}

/**
 * Weighted cross-entropy of a batch (labels as class indices, weights per sample) and its
 * gradients, averaged over the batch's total weight.
 */
export function lossAndGrad(n: Net, x: Float32Array, labels: ArrayLike<number>, weights: ArrayLike<number>, batch: number): { loss: number; grad: Params; fwd: Forward } {
  const s = n.shape;
  const fwd = forward(n, x, batch);
  const g = zeroLike(n.p);
  const F = flatSize(s), Hd = s.hidden, K = s.classes;
  let total = 0;
  for (let b = 0; b < batch; b++) total += weights[b];
  total = Math.max(total, 1e-12);
  let loss = 0;
  const dFlat = new Float32Array(batch * F);
  for (let b = 0; b < batch; b++) {
    const wgt = weights[b] / total;
    loss -= wgt * Math.log(Math.max(1e-12, fwd.probs[b * K + labels[b]]));
    const dz = new Float32Array(K);
    for (let k = 0; k < K; k++) dz[k] = wgt * (fwd.probs[b * K + k] - (k === labels[b] ? 1 : 0));
    const dh = new Float32Array(Hd);
    for (let k = 0; k < K; k++) {
      g.d2B[k] += dz[k];
      for (let j = 0; j < Hd; j++) {
        g.d2W[k * Hd + j] += dz[k] * fwd.h1[b * Hd + j];
        dh[j] += dz[k] * n.p.d2W[k * Hd + j];
      }
    }
    for (let j = 0; j < Hd; j++) {
      if (fwd.h1[b * Hd + j] <= 0) continue;
      const d = dh[j];
      g.d1B[j] += d;
      const wb = j * F, xb = b * F;
      for (let i = 0; i < F; i++) {
        g.d1W[wb + i] += d * fwd.flat[xb + i];
        dFlat[xb + i] += d * n.p.d1W[wb + i];
      }
    }
  }
  let dOut = dFlat;
  for (let i = s.convs.length - 1; i >= 0; i--) {
    const O = s.convs[i], C = convIn(s, i), side = sideAt(s, i), hw = side * side;
    const dPre = new Float32Array(batch * O * hw);
    const a = fwd.arg[i];
    for (let b = 0; b < batch; b++) {
      const po = b * O * (hw >> 2), yo = b * O * hw;
      for (let k = 0; k < O * (hw >> 2); k++) if (a[po + k] >= 0) dPre[yo + a[po + k]] += dOut[po + k];
    }
    const dIn = i > 0 ? new Float32Array(batch * C * hw) : null;
    for (let b = 0; b < batch; b++) conv3Back(fwd.ins[i], b * C * hw, C, side, side, n.p.convW[i], O, dPre, b * O * hw, g.convW[i], g.convB[i], dIn, b * C * hw);
    if (dIn) dOut = dIn;
  }
  return { loss, grad: g, fwd };
}

export interface Adam {
  m: Params;
  v: Params;
  t: number;
}

export const makeAdam = (p: Params): Adam => ({ m: zeroLike(p), v: zeroLike(p), t: 0 });

/** One Adam step (beta1 0.9, beta2 0.999, eps 1e-8: the paper's defaults) with L2 weight decay on weights. */
export function adamStep(n: Net, g: Params, opt: Adam, lr: number, decay: number): void {
  opt.t++;
  const b1 = 0.9, b2 = 0.999, eps = 1e-8;
  const c1 = 1 - b1 ** opt.t, c2 = 1 - b2 ** opt.t;
  const ps = allParams(n.p), gs = allParams(g), ms = allParams(opt.m), vs = allParams(opt.v);
  const isBias = new Set([...n.p.convB, n.p.d1B, n.p.d2B]);
  ps.forEach((p, k) => {
    const gr = gs[k], m = ms[k], v = vs[k];
    const wd = isBias.has(p) ? 0 : decay;
    for (let i = 0; i < p.length; i++) {
      const gi = gr[i] + wd * p[i];
      m[i] = b1 * m[i] + (1 - b1) * gi;
      v[i] = b2 * v[i] + (1 - b2) * gi * gi;
      p[i] -= (lr * (m[i] / c1)) / (Math.sqrt(v[i] / c2) + eps);
    }
  });
}

export function netToJson(n: Net): unknown {
  const a = (t: Float32Array) => Array.from(t);
  return { shape: n.shape, p: { convW: n.p.convW.map(a), convB: n.p.convB.map(a), d1W: a(n.p.d1W), d1B: a(n.p.d1B), d2W: a(n.p.d2W), d2B: a(n.p.d2B) } };
}

export function netFromJson(j: { shape: NetShape; p: Record<string, number[] | number[][]> }): Net {
  const f = (v: number[]) => Float32Array.from(v);
  const p = j.p as { convW: number[][]; convB: number[][]; d1W: number[]; d1B: number[]; d2W: number[]; d2B: number[] };
  return { shape: j.shape, p: { convW: p.convW.map(f), convB: p.convB.map(f), d1W: f(p.d1W), d1B: f(p.d1B), d2W: f(p.d2W), d2B: f(p.d2B) } };
}
