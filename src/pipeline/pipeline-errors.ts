/** Error catalogue of the pipeline layer (scan orchestration and its inputs). */
import { MovesiftError } from '../shared/errors.js';

export const PipelineErrorCode = {
  badDeploymentsTable: 'E_DEPLOYMENTS_TABLE',
  stopped: 'E_SCAN_STOPPED',
  nameClash: 'E_APPLY_NAME_CLASH',
  diskFull: 'E_APPLY_DISK_FULL',
  verifyFailed: 'E_APPLY_VERIFY_FAILED',
  sourceChanged: 'E_APPLY_SOURCE_CHANGED',
  sourceMissing: 'E_APPLY_SOURCE_MISSING',
  targetInsideRoot: 'E_APPLY_TARGET_INSIDE_ROOT',
  targetUnwritable: 'E_APPLY_TARGET_UNWRITABLE',
  undoHashMismatch: 'E_UNDO_HASH_MISMATCH',
  undoMissing: 'E_UNDO_FILE_MISSING',
  unknownApply: 'E_UNKNOWN_APPLY',
  invalidPlan: 'E_SHARD_PLAN',
  shardMismatch: 'E_SHARD_MISMATCH',
} as const;

export type PipelineErrorCodeValue = (typeof PipelineErrorCode)[keyof typeof PipelineErrorCode];
export const pipelineError = (code: PipelineErrorCodeValue, message: string): MovesiftError<PipelineErrorCodeValue> => new MovesiftError(code, message);
