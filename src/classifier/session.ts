/**
 * A change classifier loaded for use: the manifest checked, the file's hash checked, one
 * onnxruntime session on the CPU whose graph is checked against the manifest before it judges
 * anything. One per worker thread (onnxruntime keeps its own threads at one here: the scan's
 * pool already puts one worker on each core).
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import * as ort from 'onnxruntime-node';
import { CROP_CHANNELS } from './crops.js';
import { ClassifierErrorCode, classifierError } from './classifier-errors.js';
import { checkManifest, type ClassifierManifest } from './manifest.js';

export interface LoadedClassifier {
  manifest: ClassifierManifest;
  /** Where the manifest was read from (absolute). */
  manifestPath: string;
  /** P(subject) per crop of a batch made by crops.ts changeCrops (count x 9 x size x size). */
  subjectProbabilities(crops: Float32Array, count: number): Promise<Float32Array>;
  release(): Promise<void>;
}

export function sha256File(file: string): string {
  return createHash('sha256').update(fs.readFileSync(file)).digest('hex');
}

function readJson(file: string): unknown {
  let text: string;
  try {
    text = fs.readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw classifierError(ClassifierErrorCode.missing, `${file}: the model manifest could not be read (${code ?? String(e)})`);
  }
  try {
    return JSON.parse(text);
  } catch {
    throw classifierError(ClassifierErrorCode.manifest, `${file}: the model manifest is not JSON`);
  }
}

const shapeOf = (meta: ort.InferenceSession.ValueMetadata | undefined): ReadonlyArray<number | string> | undefined => (meta && meta.isTensor ? meta.shape : undefined);
/** A fixed dimension must equal `want`; a symbolic one (a batch axis) accepts anything. */
const dimIs = (d: number | string | undefined, want: number) => typeof d === 'number' && d === want;

/** Reads and checks a manifest and its model; throws a classifier error naming the mismatch. */
export async function loadClassifier(manifestFile: string): Promise<LoadedClassifier> {
  const manifestPath = path.resolve(manifestFile);
  const manifest = checkManifest(readJson(manifestPath));
  const onnxPath = path.join(path.dirname(manifestPath), manifest.file);
  if (!fs.existsSync(onnxPath)) throw classifierError(ClassifierErrorCode.missing, `${onnxPath}: the model file the manifest names is not there`);
  const hash = sha256File(onnxPath);
  if (hash !== manifest.sha256) throw classifierError(ClassifierErrorCode.hash, `${onnxPath}: SHA-256 is ${hash}, the manifest says ${manifest.sha256} (another or an altered file)`);
  let session: ort.InferenceSession;
  try {
    session = await ort.InferenceSession.create(onnxPath, { intraOpNumThreads: 1, interOpNumThreads: 1, executionMode: 'sequential', graphOptimizationLevel: 'all' });
  } catch (e) {
    throw classifierError(ClassifierErrorCode.corrupt, `${onnxPath}: onnxruntime could not load the model (${(e as Error).message.split('\n')[0]})`);
  }
  const S = manifest.input.size;
  const inMeta = session.inputMetadata.find((m) => m.name === manifest.input.name);
  const outMeta = session.outputMetadata.find((m) => m.name === manifest.output.name);
  const fail = (what: string) => {
    void session.release();
    return classifierError(ClassifierErrorCode.shape, `${onnxPath}: ${what}`);
  };
  if (!inMeta) throw fail(`the graph has no input "${manifest.input.name}" (it has ${session.inputNames.join(', ')})`);
  if (!outMeta) throw fail(`the graph has no output "${manifest.output.name}" (it has ${session.outputNames.join(', ')})`);
  const inShape = shapeOf(inMeta);
  if (!inShape || inShape.length !== 4 || !dimIs(inShape[1], CROP_CHANNELS.length) || !dimIs(inShape[2], S) || !dimIs(inShape[3], S)) {
    throw fail(`input "${manifest.input.name}" has shape [${inShape?.join(', ') ?? '?'}], the manifest says [N, ${CROP_CHANNELS.length}, ${S}, ${S}]`);
  }
  const outShape = shapeOf(outMeta);
  if (!outShape || outShape.length !== 2 || !dimIs(outShape[1], manifest.output.labels.length)) {
    throw fail(`output "${manifest.output.name}" has shape [${outShape?.join(', ') ?? '?'}], the manifest lists ${manifest.output.labels.length} labels`);
  }
  const subject = manifest.output.labels.indexOf(manifest.output.subject);
  const K = manifest.output.labels.length;
  const per = CROP_CHANNELS.length * S * S;
  return {
    manifest,
    manifestPath,
    async subjectProbabilities(crops, count) {
      if (count === 0) return new Float32Array(0);
      if (crops.length !== count * per) throw classifierError(ClassifierErrorCode.shape, `${count} crops of ${per} values wanted, got ${crops.length} values`);
      let out: ort.InferenceSession.OnnxValueMapType;
      try {
        out = await session.run({ [manifest.input.name]: new ort.Tensor('float32', crops, [count, CROP_CHANNELS.length, S, S]) });
      } catch (e) {
        throw classifierError(ClassifierErrorCode.corrupt, `${onnxPath}: running the model failed (${(e as Error).message.split('\n')[0]})`);
      }
      const y = out[manifest.output.name].data as Float32Array;
      const p = new Float32Array(count);
      for (let i = 0; i < count; i++) p[i] = y[i * K + subject];
      return p;
    },
    release: () => session.release(),
  };
}
