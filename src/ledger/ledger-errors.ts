/** Error catalogue of the ledger layer. */
import { MovesiftError } from '../shared/errors.js';

export const LedgerErrorCode = {
  unwritable: 'E_LEDGER_UNWRITABLE',
  missing: 'E_LEDGER_MISSING',
  notLedger: 'E_LEDGER_NOT_LEDGER',
  newer: 'E_LEDGER_NEWER',
} as const;

export type LedgerErrorCodeValue = (typeof LedgerErrorCode)[keyof typeof LedgerErrorCode];
export type LedgerError = MovesiftError<LedgerErrorCodeValue>;

export const ledgerError = (code: LedgerErrorCodeValue, message: string): LedgerError => new MovesiftError(code, message);
