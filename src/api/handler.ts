/**
 * The one request handler behind both the browser mode and the Electron shell:
 * `handle(request) → response` with the Fetch API types. Media and previews are addressed by
 * ledger id only; no route takes a file path from the client. Inputs are validated here, and
 * every error is JSON with a stable code.
 *
 *   GET  /api/events?verdict&deployment&score_min&score_max&decision&light&sort&order&offset&limit
 *   GET  /api/events/:id                      one event: frames, blobs, windows, previews
 *   GET  /api/events/:id/preview/:kind/:pos   a preview image (kind frame|heat)
 *   GET  /api/media/:id                       the original file, with range requests
 *   GET  /api/deployments                     counts per deployment, verdict and decision
 *   POST /api/decisions {events:[id], decision, source, who?}
 *   POST /api/decisions/undo {who?}           undoes the latest batch
 */
import path from 'node:path';
import { openLedger } from '../ledger/open-ledger.js';
import { createReviewQueries, type EventFilter } from '../ledger/review-queries.js';
import { cacheDirOf } from '../pipeline/scan.js';
import { ApiErrorCode, errorResponse, json } from './api-errors.js';
import { fileResponse } from './media-response.js';

export interface HandlerOptions {
  ledger: string;
}

class BadRequest extends Error {}

const VERDICTS = ['likely-blank', 'unsure', 'motion'];
const ID_RE = /^e[0-9a-f]{12}$/;

function num(q: URLSearchParams, name: string, lo: number, hi: number, integer = false): number | undefined {
  const v = q.get(name);
  if (v === null || v === '') return undefined;
  const x = Number(v);
  if (!Number.isFinite(x) || x < lo || x > hi || (integer && !Number.isInteger(x))) throw new BadRequest(`${name}: wanted ${integer ? 'integer' : 'number'} ${lo}-${hi}, got ${JSON.stringify(v)}`);
  return x;
}

function oneOf<T extends string>(q: URLSearchParams, name: string, allowed: readonly T[]): T | undefined {
  const v = q.get(name);
  if (v === null || v === '') return undefined;
  if (!allowed.includes(v as T)) throw new BadRequest(`${name}: wanted one of ${allowed.join(', ')}, got ${JSON.stringify(v)}`);
  return v as T;
}

export function parseFilter(q: URLSearchParams): EventFilter {
  const known = new Set(['verdict', 'deployment', 'score_min', 'score_max', 'decision', 'light', 'sort', 'order', 'offset', 'limit']);
  for (const k of q.keys()) if (!known.has(k)) throw new BadRequest(`unknown filter ${JSON.stringify(k)}`);
  const deployment = q.get('deployment') ?? undefined;
  if (deployment !== undefined && deployment.length > 500) throw new BadRequest('deployment: too long');
  return {
    verdict: oneOf(q, 'verdict', VERDICTS),
    deployment: deployment || undefined,
    scoreMin: num(q, 'score_min', 0, 1),
    scoreMax: num(q, 'score_max', 0, 1),
    decision: oneOf(q, 'decision', ['keep', 'set-aside', 'none'] as const),
    light: oneOf(q, 'light', ['colour', 'infrared'] as const),
    sort: oneOf(q, 'sort', ['time', 'score'] as const) ?? 'time',
    desc: (oneOf(q, 'order', ['asc', 'desc'] as const) ?? 'asc') === 'desc',
    offset: num(q, 'offset', 0, 1e9, true) ?? 0,
    limit: num(q, 'limit', 1, 1000, true) ?? 200,
  };
}

export function createHandler(o: HandlerOptions): { handle(request: Request): Promise<Response>; close(): void } {
  const db = openLedger(o.ledger);
  const q = createReviewQueries(db);
  const cache = cacheDirOf(o.ledger);

  async function route(req: Request): Promise<Response> {
    const url = new URL(req.url);
    const parts = url.pathname.split('/').filter(Boolean).map(decodeURIComponent);
    if (parts[0] !== 'api') return errorResponse(404, ApiErrorCode.notFound, `no route ${url.pathname}`);
    const [, what, id, sub, kind, pos] = parts;
    const method = req.method.toUpperCase();
    const only = (m: string): Response | undefined => (method === m || (m === 'GET' && method === 'HEAD') ? undefined : errorResponse(405, ApiErrorCode.methodNotAllowed, `${method} is not allowed on ${url.pathname}`));
    if (what === 'events' && !id) return only('GET') ?? json(q.listEvents(parseFilter(url.searchParams)));
    if (what === 'events' && id) {
      if (!ID_RE.test(id)) throw new BadRequest(`event id: wanted "e" and 12 hex digits, got ${JSON.stringify(id)}`);
      if (!sub && parts.length === 3) {
        const e = q.event(id);
        return only('GET') ?? (e ? json(e) : errorResponse(404, ApiErrorCode.notFound, `no event ${id}`));
      }
      if (sub === 'preview' && parts.length === 6) {
        if (kind !== 'frame' && kind !== 'heat') throw new BadRequest(`preview kind: wanted frame or heat, got ${JSON.stringify(kind)}`);
        if (!/^\d{1,4}$/.test(pos)) throw new BadRequest(`preview position: wanted integer 0-9999, got ${JSON.stringify(pos)}`);
        const rel = q.previewPath(id, kind, Number(pos));
        if (!rel) return errorResponse(404, ApiErrorCode.notFound, `no ${kind} preview ${pos} for event ${id}`);
        return only('GET') ?? fileResponse(path.join(cache, rel), req);
      }
    }
    if (what === 'media' && id && parts.length === 3) {
      if (!/^\d{1,12}$/.test(id)) throw new BadRequest(`media id: wanted a positive integer, got ${JSON.stringify(id)}`);
      const m = q.mediaFile(Number(id));
      if (!m) return errorResponse(404, ApiErrorCode.notFound, `no media ${id}`);
      return only('GET') ?? fileResponse(path.join(m.root, m.rel_path), req, 'private, max-age=60');
    }
    if (what === 'deployments' && parts.length === 2) return only('GET') ?? json(q.summary());
    if (what === 'decisions' && parts.length === 2) {
      const bad = only('POST');
      if (bad) return bad;
      const body = await readJson(req);
      const events = body.events;
      if (!Array.isArray(events) || events.length === 0 || events.length > 200000 || events.some((e) => typeof e !== 'string' || !ID_RE.test(e))) throw new BadRequest('events: wanted a non-empty array of event ids');
      if (body.decision !== 'keep' && body.decision !== 'set-aside') throw new BadRequest(`decision: wanted keep or set-aside, got ${JSON.stringify(body.decision)}`);
      if (body.source !== 'single' && body.source !== 'bulk') throw new BadRequest(`source: wanted single or bulk, got ${JSON.stringify(body.source)}`);
      const who = typeof body.who === 'string' ? body.who.slice(0, 200) : null;
      return json(q.decide(events as string[], body.decision, body.source, who));
    }
    if (what === 'decisions' && id === 'undo' && parts.length === 3) {
      const bad = only('POST');
      if (bad) return bad;
      const body = await readJson(req);
      return json(q.undoLast(typeof body.who === 'string' ? body.who.slice(0, 200) : null));
    }
    return errorResponse(404, ApiErrorCode.notFound, `no route ${url.pathname}`);
  }

  return {
    async handle(req) {
      try {
        return await route(req);
      } catch (e) {
        if (e instanceof BadRequest) return errorResponse(400, ApiErrorCode.badRequest, e.message);
        if (e instanceof URIError) return errorResponse(400, ApiErrorCode.badRequest, 'malformed percent-encoding in the path');
        throw e;
      }
    },
    close: () => db.close(),
  };
}

async function readJson(req: Request): Promise<Record<string, unknown>> {
  const text = await req.text();
  if (text.length > 16 << 20) throw new BadRequest('body: too large');
  try {
    const v = text ? JSON.parse(text) : {};
    if (typeof v !== 'object' || v === null || Array.isArray(v)) throw new Error();
    return v as Record<string, unknown>;
  } catch {
    throw new BadRequest('body: wanted a JSON object');
  }
}
