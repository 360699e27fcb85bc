/** Typed results for values that cross a boundary (worker replies, the request handler, the CLI). */
import type { ErrorCodeValue } from './errors.js';

export type Result<T, C extends string = ErrorCodeValue> =
  | { ok: true; value: T }
  | { ok: false; code: C; message: string };

export const ok = <T>(value: T): Result<T, never> => ({ ok: true, value });
export const fail = <C extends string>(code: C, message: string): Result<never, C> => ({
  ok: false,
  code,
  message,
});
