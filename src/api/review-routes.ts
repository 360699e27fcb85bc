/**
 * The routes over an open ledger: event pages, one event, previews and originals by id (never
 * by path), deployment counts, and decisions with undo.
 *
 *   GET  /api/events?verdict&deployment&score_min&score_max&decision&light&sort&order&offset&limit&total
 *   GET  /api/events/ids?<same filters>       every id the filter shows, in grid order, and counts per verdict
 *   GET  /api/events/:id                      one event: frames, blobs, windows, previews
 *   GET  /api/events/:id/preview/:kind/:pos   a preview image (kind frame|heat)
 *   GET  /api/media/:id                       the original file, with range requests
 *   GET  /api/deployments                     counts per deployment, verdict and decision
 *   GET  /api/health                          camera problems per deployment (deployment-health.ts)
 *   POST /api/decisions {events:[id], decision, source, who?}
 *   GET  /api/decisions/last                  the batch an undo would take back (or null)
 *   POST /api/decisions/undo {who?, batch?}   undoes the latest batch not yet undone (only if it is
 *                                             `batch`, when given: 409 otherwise)
 */
import path from 'node:path';
import type { ReviewQueries } from '../ledger/review-queries.js';
import { deploymentsHealth } from '../pipeline/report.js';
import { ApiErrorCode, HttpError, badRequest, json } from './api-errors.js';
import { fileResponse } from './media-response.js';
import { EVENT_ID_RE, eventIds, parseFilter, readJson, who } from './request-params.js';

export interface OpenLedger {
  file: string;
  q: ReviewQueries;
  cacheDir: string;
}

const notFound = (what: string): HttpError => new HttpError(404, ApiErrorCode.notFound, what);

export async function reviewRoute(req: Request, parts: string[], url: URL, l: OpenLedger, only: (m: string) => void): Promise<Response> {
  const [, what, id, sub, kind, pos] = parts;
  const { q } = l;
  if (what === 'events' && parts.length === 2) {
    only('GET');
    const { withTotal, ...f } = parseFilter(url.searchParams);
    return json(q.listEvents(f, withTotal));
  }
  if (what === 'events' && id === 'ids' && parts.length === 3) {
    only('GET');
    const { withTotal: _, offset: _o, limit: _l, ...f } = parseFilter(url.searchParams);
    return json({ ids: q.idsOf(f), verdicts: q.verdictCountsOf(f) });
  }
  if (what === 'events' && id) {
    if (!EVENT_ID_RE.test(id)) throw badRequest(`event id: wanted "e" and 12 hex digits, got ${JSON.stringify(id)}`);
    if (parts.length === 3) {
      only('GET');
      const e = q.event(id);
      if (!e) throw notFound(`no event ${id}`);
      return json(e);
    }
    if (sub === 'preview' && parts.length === 6) {
      if (kind !== 'frame' && kind !== 'heat') throw badRequest(`preview kind: wanted frame or heat, got ${JSON.stringify(kind)}`);
      if (!/^\d{1,4}$/.test(pos)) throw badRequest(`preview position: wanted integer 0-9999, got ${JSON.stringify(pos)}`);
      only('GET');
      const rel = q.previewPath(id, kind, Number(pos));
      if (!rel) throw notFound(`no ${kind} preview ${pos} for event ${id}`);
      return fileResponse(path.join(l.cacheDir, rel), req);
    }
  }
  if (what === 'media' && id && parts.length === 3) {
    if (!/^\d{1,12}$/.test(id)) throw badRequest(`media id: wanted a positive integer, got ${JSON.stringify(id)}`);
    only('GET');
    const m = q.mediaFile(Number(id));
    if (!m) throw notFound(`no media ${id}`);
    // No caching: the same id points at the set-aside folder after an apply and back after an undo.
    return fileResponse(m.moved_to ?? path.join(m.root, m.rel_path), req, 'no-cache');
  }
  if (what === 'deployments' && parts.length === 2) {
    only('GET');
    return json(q.summary());
  }
  if (what === 'health' && parts.length === 2) {
    only('GET');
    return json(deploymentsHealth(q.healthRows()));
  }
  if (what === 'decisions' && parts.length === 2) {
    only('POST');
    const body = await readJson(req);
    const ids = eventIds(body.events);
    if (body.decision !== 'keep' && body.decision !== 'set-aside') throw badRequest(`decision: wanted keep or set-aside, got ${JSON.stringify(body.decision)}`);
    if (body.source !== 'single' && body.source !== 'bulk') throw badRequest(`source: wanted single or bulk, got ${JSON.stringify(body.source)}`);
    return json(q.decide(ids, body.decision, body.source, who(body.who)));
  }
  if (what === 'decisions' && id === 'last' && parts.length === 3) {
    only('GET');
    return json(q.lastBatch());
  }
  if (what === 'decisions' && id === 'undo' && parts.length === 3) {
    only('POST');
    const body = await readJson(req);
    if (body.batch !== undefined && (typeof body.batch !== 'string' || body.batch.length > 100)) throw badRequest(`batch: wanted a batch id, got ${JSON.stringify(body.batch)}`);
    const r = q.undoLast(who(body.who), body.batch as string | undefined);
    if (r.stale) throw new HttpError(409, ApiErrorCode.staleUndo, 'the latest decisions changed since you were asked; nothing was undone');
    return json(r);
  }
  throw notFound(`no route ${url.pathname}`);
}
