/** Error catalogue of the command line, and the exit codes of DESIGN.md. */
import { ClassifierErrorCode } from '../classifier/classifier-errors.js';
import { MovesiftError } from '../shared/errors.js';

export const ExitCode = { done: 0, failure: 1, usage: 2 } as const;

export const CliErrorCode = { usage: 'E_USAGE' } as const;
export const usageError = (message: string): MovesiftError<'E_USAGE'> => new MovesiftError(CliErrorCode.usage, message);

/** Codes that mean "the command was asked wrongly": exit 2 with the sentence, no stack. */
export const USAGE_CODES: ReadonlySet<string> = new Set(['E_USAGE', 'E_FOLDER_MISSING', 'E_LEDGER_UNWRITABLE', 'E_LEDGER_MISSING', 'E_LEDGER_NOT_LEDGER', 'E_LEDGER_NEWER', 'E_DEPLOYMENTS_TABLE', 'E_INVALID_ARGUMENT', 'E_RENDERER_MISSING', 'E_APPLY_TARGET_INSIDE_ROOT', 'E_APPLY_TARGET_UNWRITABLE', 'E_UNKNOWN_APPLY', 'E_AUDIT_NOTHING_SET_ASIDE', 'E_AUDIT_UNKNOWN', 'E_AUDIT_NOT_SAMPLED', 'E_EXPORT_INCOMPLETE', 'E_OUTPUT_EXISTS', 'E_OUTPUT_PROTECTED', 'E_CALIBRATE_TOO_FEW_ANIMALS', 'E_LEDGER_BUSY', 'E_SHARD_PLAN', 'E_SHARD_MISMATCH', 'E_SLURM_MISSING', 'E_LEARN_TOO_FEW', ...Object.values(ClassifierErrorCode)]);
