/**
 * The contract a change classifier follows (models/<name>.json beside <name>.onnx). Any model
 * that keeps it works with `movesift scan --classifier <manifest.json>`; one that does not is
 * refused with the mismatch named (classifier-errors.ts).
 *
 * The manifest says what goes in (the input's name, layout, size and planes, and the
 * preprocessing that made them: crops.ts), what comes out (the output's name, the class labels
 * in output order and which label means a subject is present), which file (with its SHA-256, so
 * a swapped or damaged file is caught before it judges anything), and what the model was
 * trained on with its measured metrics, which the report repeats.
 */
import { checkCombineRule, type CombineRule } from './combine.js';
import { CROP_CHANNELS, PREPROCESS } from './crops.js';
import { ClassifierErrorCode, classifierError } from './classifier-errors.js';

export const MANIFEST_SCHEMA = 'movesift.classifier/1';

export interface ClassifierManifest {
  schema: typeof MANIFEST_SCHEMA;
  name: string;
  /** The .onnx file, relative to the manifest's folder. */
  file: string;
  sha256: string;
  input: { name: string; layout: 'NCHW'; size: number; channels: string[]; preprocess: string };
  output: { name: string; labels: string[]; subject: string };
  /** Crops per event: the event's strongest tracks the model looks at. */
  cropsPerEvent: number;
  /** How its opinion joins the motion score (combine.ts), fitted with the model. */
  combine: CombineRule;
  /** Free text: what it was trained on (the shipped model says: generated scenes). */
  trainedOn: string;
  /** Measured metrics, as the training script wrote them. */
  metrics?: Record<string, unknown>;
}

const bad = (field: string, wanted: string) => classifierError(ClassifierErrorCode.manifest, `model manifest: ${field} should be ${wanted}`);

function str(o: Record<string, unknown>, k: string, path: string): string {
  const v = o[k];
  if (typeof v !== 'string' || !v) throw bad(`${path}${k}`, 'a non-empty string');
  return v;
}
function obj(v: unknown, path: string): Record<string, unknown> {
  if (!v || typeof v !== 'object' || Array.isArray(v)) throw bad(path, 'an object');
  return v as Record<string, unknown>;
}

/** Checks a parsed manifest's fields and that this program can feed it. */
export function checkManifest(raw: unknown): ClassifierManifest {
  const m = obj(raw, 'the manifest');
  if (m.schema !== MANIFEST_SCHEMA) throw bad('schema', `"${MANIFEST_SCHEMA}"`);
  const name = str(m, 'name', '');
  const file = str(m, 'file', '');
  if (!file.endsWith('.onnx') || file.includes('..')) throw bad('file', 'an .onnx file beside the manifest');
  const sha256 = str(m, 'sha256', '');
  if (!/^[0-9a-f]{64}$/.test(sha256)) throw bad('sha256', '64 lower-case hex digits');
  const i = obj(m.input, 'input');
  const inputName = str(i, 'name', 'input.');
  if (i.layout !== 'NCHW') throw bad('input.layout', '"NCHW"');
  const size = i.size;
  if (typeof size !== 'number' || !Number.isInteger(size) || size < 8 || size > 256) throw bad('input.size', 'an integer 8..256');
  const preprocess = str(i, 'preprocess', 'input.');
  if (preprocess !== PREPROCESS) throw classifierError(ClassifierErrorCode.preprocess, `model manifest: input.preprocess is "${preprocess}"; this program makes "${PREPROCESS}" crops`);
  const channels = i.channels;
  if (!Array.isArray(channels) || channels.length !== CROP_CHANNELS.length || channels.some((c, k) => c !== CROP_CHANNELS[k])) {
    throw classifierError(ClassifierErrorCode.shape, `model manifest: input.channels should be ${JSON.stringify(CROP_CHANNELS)}`);
  }
  const o = obj(m.output, 'output');
  const outputName = str(o, 'name', 'output.');
  const labels = o.labels;
  if (!Array.isArray(labels) || labels.length < 2 || labels.some((l) => typeof l !== 'string' || !l) || new Set(labels).size !== labels.length) {
    throw classifierError(ClassifierErrorCode.labels, 'model manifest: output.labels should list two or more distinct class names in output order');
  }
  const subject = o.subject;
  if (typeof subject !== 'string' || !labels.includes(subject)) throw classifierError(ClassifierErrorCode.labels, `model manifest: output.subject should be one of ${JSON.stringify(labels)}`);
  const per = m.cropsPerEvent;
  if (typeof per !== 'number' || !Number.isInteger(per) || per < 1 || per > 16) throw bad('cropsPerEvent', 'an integer 1..16');
  const combine = checkCombineRule(m.combine);
  const trainedOn = str(m, 'trainedOn', '');
  if (m.metrics !== undefined) obj(m.metrics, 'metrics');
  return {
    schema: MANIFEST_SCHEMA, name, file, sha256,
    input: { name: inputName, layout: 'NCHW', size, channels: [...channels] as string[], preprocess },
    output: { name: outputName, labels: [...labels] as string[], subject },
    cropsPerEvent: per, combine, trainedOn,
    ...(m.metrics ? { metrics: m.metrics as Record<string, unknown> } : {}),
  };
}
