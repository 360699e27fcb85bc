/**
 * The error catalogue shared by every layer. Codes are stable strings: the CLI, the request
 * handler and the UI switch on `code`, never on message text.
 */
export const ErrorCode = {
  invalidArgument: 'E_INVALID_ARGUMENT',
  sizeMismatch: 'E_SIZE_MISMATCH',
  emptyFrame: 'E_EMPTY_FRAME',
  notEnoughFrames: 'E_NOT_ENOUGH_FRAMES',
} as const;

export type ErrorCodeValue = (typeof ErrorCode)[keyof typeof ErrorCode];

/** Each layer keeps its own catalogue of codes (media, ledger, pipeline, cli); all share this class. */
export class MovesiftError<C extends string = string> extends Error {
  readonly code: C;
  constructor(code: C, message: string) {
    super(message);
    this.name = 'MovesiftError';
    this.code = code;
  }
}

export function invalidArgument(name: string, wanted: string, got: unknown): MovesiftError<ErrorCodeValue> {
  return new MovesiftError(ErrorCode.invalidArgument, `${name}: wanted ${wanted}, got ${describe(got)}`);
}

export function sizeMismatch(name: string, wanted: string, got: string): MovesiftError<ErrorCodeValue> {
  return new MovesiftError(ErrorCode.sizeMismatch, `${name}: wanted ${wanted}, got ${got}`);
}

export function emptyFrame(name: string): MovesiftError<ErrorCodeValue> {
  return new MovesiftError(ErrorCode.emptyFrame, `${name}: frame has no pixels`);
}

export function notEnoughFrames(name: string, wanted: number, got: number): MovesiftError<ErrorCodeValue> {
  return new MovesiftError(
    ErrorCode.notEnoughFrames,
    `${name}: wanted at least ${wanted} frame(s), got ${got}`,
  );
}

export function describe(value: unknown): string {
  if (typeof value === 'number') return Number.isNaN(value) ? 'NaN' : String(value);
  if (typeof value === 'string') return JSON.stringify(value);
  if (value === null || value === undefined) return String(value);
  if (Array.isArray(value)) return `array of ${value.length}`;
  return typeof value;
}
