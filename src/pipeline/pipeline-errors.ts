/** Error catalogue of the pipeline layer (scan orchestration and its inputs). */
import { MovesiftError } from '../shared/errors.js';

export const PipelineErrorCode = {
  badDeploymentsTable: 'E_DEPLOYMENTS_TABLE',
  stopped: 'E_SCAN_STOPPED',
} as const;

export type PipelineErrorCodeValue = (typeof PipelineErrorCode)[keyof typeof PipelineErrorCode];
export const pipelineError = (code: PipelineErrorCodeValue, message: string): MovesiftError<PipelineErrorCodeValue> => new MovesiftError(code, message);
