/**
 * Error catalogue of the classifier layer: loading a model and its manifest. Each code names
 * what is wrong with the model a person gave, so they can fix that file or pick another.
 */
import { MovesiftError } from '../shared/errors.js';

export const ClassifierErrorCode = {
  /** The manifest is not JSON, or a field is missing or of the wrong kind. */
  manifest: 'E_MODEL_MANIFEST',
  /** The manifest or the .onnx file it names is not there. */
  missing: 'E_MODEL_MISSING',
  /** The .onnx file's SHA-256 is not the manifest's: another or an altered file. */
  hash: 'E_MODEL_HASH',
  /** onnxruntime could not load the file, or running it failed. */
  corrupt: 'E_MODEL_CORRUPT',
  /** The graph's input or output is not what the manifest says (name, rank, size, channels). */
  shape: 'E_MODEL_SHAPE',
  /** Class labels missing, or none names the subject. */
  labels: 'E_MODEL_LABELS',
  /** The model wants a preprocessing this version of the program does not have. */
  preprocess: 'E_MODEL_PREPROCESS',
} as const;

export type ClassifierErrorCodeValue = (typeof ClassifierErrorCode)[keyof typeof ClassifierErrorCode];

export const classifierError = (code: ClassifierErrorCodeValue, message: string): MovesiftError<ClassifierErrorCodeValue> => new MovesiftError(code, message);
