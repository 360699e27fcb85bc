/**
 * `npm run train:classifier`: trains the shipped change classifier on crops of generated scenes
 * (tools/classifier/crop-data.ts), validates it in family and out of family, fits how it joins
 * the motion score (src/classifier/combine.ts) on a set of its own, and writes
 * models/change-classifier.onnx with its manifest (the contract of src/classifier/manifest.ts,
 * metrics included) and its model card. Deterministic for a given seed and scale.
 *
 *   npm run train:classifier -- [--scale 1] [--epochs 12] [--data .cache/classifier-data] [--fresh]
 *                               [--reuse-net]   (the weights the last run left in --data: refit
 *                                                the combine rule and the tables only)
 */
import fs from 'node:fs';
import path from 'node:path';
import { CROP_CHANNELS, PREPROCESS } from '../src/classifier/crops.js';
import { MANIFEST_SCHEMA, type ClassifierManifest } from '../src/classifier/manifest.js';
import { writeOnnx } from '../src/classifier/onnx-graph.js';
import { sha256File } from '../src/classifier/session.js';
import { CROPS_PER_EVENT, INPUT_SIZE, joinParts, makePart, partFile, SETS, setRequests, type CropSet, type SetName, type SetPart } from './classifier/crop-data.js';
import { eventProbabilities, trainNet, predict, type TrainLog } from './classifier/train.js';
import { fitCombine, judgeSet, type SetJudgement } from './classifier/judge.js';
import { netFromJson, netToJson, paramCount, toLayers } from './classifier/net.js';
import { inParts } from './parts.js';

const arg = (name: string, def: string) => {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? process.argv[i + 1] : def;
};
const scale = Number(arg('scale', '1'));
const epochs = Number(arg('epochs', '12'));
const dataDir = path.resolve(arg('data', '.cache/classifier-data'));
const modelsDir = path.resolve(arg('out', 'models'));
const NAME = 'change-classifier';

async function makeData(): Promise<Map<SetName, CropSet>> {
  const index = path.join(dataDir, `index-${scale}.json`);
  let parts: Array<{ set: SetName; part: SetPart }>;
  if (fs.existsSync(index) && !process.argv.includes('--fresh')) {
    parts = JSON.parse(fs.readFileSync(index, 'utf8'));
  } else {
    fs.mkdirSync(dataDir, { recursive: true });
    parts = await inParts(import.meta.filename, async (part, count) => {
      const out: Array<{ set: SetName; part: SetPart }> = [];
      for (const set of SETS) {
        const reqs = setRequests(set, scale).filter((_, i) => i % count === part);
        const started = Date.now();
        out.push({ set, part: makePart(set, reqs, partFile(dataDir, set, part), set === 'train' ? 2 : 0) });
        console.log(`part ${part}: ${set} ${reqs.length} scenes in ${((Date.now() - started) / 1000).toFixed(0)} s`);
      }
      return out;
    });
    fs.writeFileSync(index, JSON.stringify(parts));
  }
  const sets = new Map<SetName, CropSet>();
  for (const set of SETS) sets.set(set, joinParts(parts.filter((p) => p.set === set).map((p) => p.part)));
  return sets;
}

async function main(): Promise<void> {
  const sets = await makeData();
  for (const [name, s] of sets) console.log(`${name}: ${s.events.length} events, ${s.labels.length} crops, ${s.labels.reduce((a, b) => a + b, 0)} on a subject`);
  const shape = { channels: CROP_CHANNELS.length, size: INPUT_SIZE, convs: [8, 16, 32], hidden: 32, classes: 2 };
  const log: TrainLog[] = [];
  const weightsFile = path.join(dataDir, `${NAME}-weights.json`);
  const reuse = process.argv.includes('--reuse-net');
  const saved = reuse ? (JSON.parse(fs.readFileSync(weightsFile, 'utf8')) as { net: Parameters<typeof netFromJson>[0]; log: TrainLog[] }) : undefined;
  if (saved) log.push(...saved.log);
  const net = saved
    ? netFromJson(saved.net)
    : trainNet(sets.get('train')!, shape, { epochs, seed: 1, onEpoch: (l) => (log.push(l), console.log(`epoch ${l.epoch}: loss ${l.loss.toFixed(4)} (${l.seconds.toFixed(0)} s)`)) });
  if (!saved) fs.writeFileSync(weightsFile, JSON.stringify({ net: netToJson(net), log }));
  const probs = new Map<SetName, Float32Array>();
  for (const [name, s] of sets) if (name !== 'train') probs.set(name, predict(net, s.crops, s.labels.length));
  const combine = fitCombine(sets.get('combine')!, eventProbabilities(sets.get('combine')!, probs.get('combine')!));
  const judged: Record<string, SetJudgement> = {};
  for (const [name, s] of sets) if (name !== 'train') judged[name] = judgeSet(s, probs.get(name)!, combine);
  console.table(Object.fromEntries(Object.entries(judged).map(([k, j]) => [k, j.table])));
  const bytes = writeOnnx({
    name: NAME, inputName: 'crops', inputShape: ['N', CROP_CHANNELS.length, INPUT_SIZE, INPUT_SIZE], outputName: 'probabilities', outputShape: ['N', 2], layers: toLayers(net),
    metadata: { trainedOn: 'generated scenes (tools/scenes), home ranges', preprocess: PREPROCESS },
  });
  fs.mkdirSync(modelsDir, { recursive: true });
  const onnxFile = path.join(modelsDir, `${NAME}.onnx`);
  fs.writeFileSync(onnxFile, bytes);
  const manifest: ClassifierManifest = {
    schema: MANIFEST_SCHEMA, name: NAME, file: `${NAME}.onnx`, sha256: sha256File(onnxFile),
    input: { name: 'crops', layout: 'NCHW', size: INPUT_SIZE, channels: [...CROP_CHANNELS], preprocess: PREPROCESS },
    output: { name: 'probabilities', labels: ['blank', 'subject'], subject: 'subject' },
    cropsPerEvent: CROPS_PER_EVENT,
    combine,
    trainedOn: `Generated scenes only (tools/scenes, the motion model's fitting ranges, scale ${scale}); never a real photograph. Validated in family on the validation seeds and out of family on other cameras, trails and a busy trail (tools/scenes/families.ts).`,
    metrics: { parameters: paramCount(net), bytes: bytes.length, epochs, sets: Object.fromEntries(Object.entries(judged).map(([k, j]) => [k, j.table])), training: log },
  };
  fs.writeFileSync(path.join(modelsDir, `${NAME}.json`), JSON.stringify(manifest, null, 2) + '\n');
  console.log(`wrote ${onnxFile} (${bytes.length} bytes, ${paramCount(net)} parameters)`);
}

await main();
