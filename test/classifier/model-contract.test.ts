/**
 * The model contract (src/classifier/manifest.ts, session.ts): a model that keeps it loads and
 * judges crops exactly as its own network computes them; one that does not is refused with a
 * stable code that names the mismatch.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ClassifierErrorCode } from '../../src/classifier/classifier-errors.js';
import { CROP_CHANNELS, PREPROCESS } from '../../src/classifier/crops.js';
import { writeOnnx } from '../../src/classifier/onnx-graph.js';
import { loadClassifier, sha256File } from '../../src/classifier/session.js';
import { forward, initNet, toLayers } from '../../tools/classifier/net.js';
import { makeRng } from '../../tools/scenes/random.js';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'movesift-model-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

const S = 8;
const net = initNet({ channels: CROP_CHANNELS.length, size: S, convs: [4], hidden: 6, classes: 2 }, makeRng(21));
const bytes = writeOnnx({ name: 't', inputName: 'crops', inputShape: ['N', 9, S, S], outputName: 'p', outputShape: ['N', 2], layers: toLayers(net) });
fs.writeFileSync(path.join(dir, 'good.onnx'), bytes);

const manifest = (over: Record<string, unknown> = {}) => ({
  schema: 'movesift.classifier/1', name: 'test-model', file: 'good.onnx', sha256: sha256File(path.join(dir, 'good.onnx')),
  input: { name: 'crops', layout: 'NCHW', size: S, channels: [...CROP_CHANNELS], preprocess: PREPROCESS },
  output: { name: 'p', labels: ['blank', 'subject'], subject: 'subject' },
  cropsPerEvent: 3, combine: { classifierBlank: 0.02, motionCeiling: 0.7 },
  trainedOn: 'a test', ...over,
});
let n = 0;
const write = (m: unknown, raw?: string) => {
  const f = path.join(dir, `m${n++}.json`);
  fs.writeFileSync(f, raw ?? JSON.stringify(m));
  return f;
};
const codeOf = async (f: string) => loadClassifier(f).then(() => 'loaded', (e) => (e as { code: string }).code);

describe('a model that keeps the contract', () => {
  it('loads, and its probabilities are its network’s', async () => {
    const c = await loadClassifier(write(manifest()));
    const rng = makeRng(2);
    const x = Float32Array.from({ length: 3 * 9 * S * S }, () => rng.range(-2, 2));
    const p = await c.subjectProbabilities(x, 3);
    const mine = forward(net, x, 3).probs;
    for (let i = 0; i < 3; i++) expect(Math.abs(p[i] - mine[i * 2 + 1])).toBeLessThan(1e-5);
    expect(await c.subjectProbabilities(new Float32Array(0), 0)).toHaveLength(0);
    await expect(c.subjectProbabilities(new Float32Array(5), 1)).rejects.toMatchObject({ code: ClassifierErrorCode.shape });
    // The subject label picks its column: swapped labels give the other class's probability.
    const swapped = await loadClassifier(write(manifest({ output: { name: 'p', labels: ['subject', 'blank'], subject: 'subject' } })));
    const q = await swapped.subjectProbabilities(x, 3);
    for (let i = 0; i < 3; i++) expect(q[i]).toBeCloseTo(1 - p[i], 5);
    await c.release();
    await swapped.release();
  });
});

describe('a model that does not is refused with its reason', () => {
  it.each([
    ['no manifest', () => path.join(dir, 'absent.json'), ClassifierErrorCode.missing],
    ['a manifest that is not JSON', () => write(null, '{ not json'), ClassifierErrorCode.manifest],
    ['another schema', () => write(manifest({ schema: 'other/1' })), ClassifierErrorCode.manifest],
    ['a missing .onnx file', () => write(manifest({ file: 'gone.onnx' })), ClassifierErrorCode.missing],
    ['a hash that does not match', () => write(manifest({ sha256: '0'.repeat(64) })), ClassifierErrorCode.hash],
    ['labels missing', () => write(manifest({ output: { name: 'p', subject: 'subject' } })), ClassifierErrorCode.labels],
    ['no label for the subject', () => write(manifest({ output: { name: 'p', labels: ['blank', 'animal'], subject: 'subject' } })), ClassifierErrorCode.labels],
    ['another preprocessing', () => write(manifest({ input: { name: 'crops', layout: 'NCHW', size: S, channels: [...CROP_CHANNELS], preprocess: 'other/2' } })), ClassifierErrorCode.preprocess],
    ['other planes', () => write(manifest({ input: { name: 'crops', layout: 'NCHW', size: S, channels: ['r', 'g', 'b'], preprocess: PREPROCESS } })), ClassifierErrorCode.shape],
    ['a wrong input size', () => write(manifest({ input: { name: 'crops', layout: 'NCHW', size: 16, channels: [...CROP_CHANNELS], preprocess: PREPROCESS } })), ClassifierErrorCode.shape],
    ['a wrong input name', () => write(manifest({ input: { name: 'images', layout: 'NCHW', size: S, channels: [...CROP_CHANNELS], preprocess: PREPROCESS } })), ClassifierErrorCode.shape],
    ['more labels than outputs', () => write(manifest({ output: { name: 'p', labels: ['blank', 'subject', 'person'], subject: 'subject' } })), ClassifierErrorCode.shape],
    ['a combine rule out of range', () => write(manifest({ combine: { classifierBlank: 0.9, motionCeiling: 0.7 } })), ClassifierErrorCode.manifest],
    ['no combine rule', () => write(manifest({ combine: undefined })), ClassifierErrorCode.manifest],
  ])('%s', async (_what, file, code) => {
    expect(await codeOf(file())).toBe(code);
  });

  it('a corrupt file whose hash matches the manifest', async () => {
    const bad = path.join(dir, 'corrupt.onnx');
    fs.writeFileSync(bad, bytes.subarray(0, bytes.length >> 1));
    expect(await codeOf(write(manifest({ file: 'corrupt.onnx', sha256: sha256File(bad) })))).toBe(ClassifierErrorCode.corrupt);
  });
});
