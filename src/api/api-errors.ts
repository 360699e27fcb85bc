/** Error catalogue of the request handler; every error response is JSON {code, message}. */
export const ApiErrorCode = {
  notFound: 'E_NOT_FOUND',
  badRequest: 'E_BAD_REQUEST',
  methodNotAllowed: 'E_METHOD_NOT_ALLOWED',
  rangeNotSatisfiable: 'E_RANGE_NOT_SATISFIABLE',
  mediaMissing: 'E_MEDIA_MISSING',
  noLedger: 'E_NO_LEDGER',
  scanRunning: 'E_SCAN_RUNNING',
  noScan: 'E_NO_SCAN',
  taskRunning: 'E_TASK_RUNNING',
  staleUndo: 'E_UNDO_STALE',
} as const;

export type ApiErrorCodeValue = (typeof ApiErrorCode)[keyof typeof ApiErrorCode];

/** Thrown inside a route, turned into one JSON error response by the handler. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

export const badRequest = (message: string): HttpError => new HttpError(400, ApiErrorCode.badRequest, message);

export function errorResponse(status: number, code: ApiErrorCodeValue | string, message: string): Response {
  return new Response(JSON.stringify({ code, message }), { status, headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store' } });
}

export const json = (body: unknown, status = 200): Response =>
  new Response(JSON.stringify(body), { status, headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store' } });
