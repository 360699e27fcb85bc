/**
 * The one request handler behind both the browser mode and the Electron shell:
 * `handle(request) → response` with the Fetch API types. It composes the session (which ledger
 * is open), the scan started from the start screen, the review routes over the open ledger, and
 * the built renderer for every path outside /api. Every error is JSON with a stable code.
 *
 *   GET  /api/session                     the open ledger (or none), the engine version, the scan state
 *   POST /api/session {ledger, create?}   open an existing ledger, or make a new one
 *   POST /api/scans {folders:[...], ledger?, flow?, deploymentCut?}   scan folders into the open (or given) ledger
 *   POST /api/scans/stop                  stop the running scan after its current event
 *   GET  /api/scans/progress              the scan's state as server-sent events
 *   GET  /api/tasks/progress              the running apply, undo or cut as server-sent events
 *   ...  action routes (action-routes.ts), then review routes (review-routes.ts)
 */
import os from 'node:os';
import path from 'node:path';
import { existsSync } from 'node:fs';
import { openLedger, type Ledger } from '../ledger/open-ledger.js';
import { createReviewQueries } from '../ledger/review-queries.js';
import { cacheDirOf, scan } from '../pipeline/scan.js';
import { ENGINE_VERSION } from '../pipeline/engine-version.js';
import type { SessionInfo } from '../shared/review-api.js';
import { ApiErrorCode, HttpError, badRequest, errorResponse, json } from './api-errors.js';
import { eventStream } from './event-stream.js';
import { readJson, userPath } from './request-params.js';
import { reviewRoute, type OpenLedger } from './review-routes.js';
import { createScanJobs, type ScanJobState } from './scan-jobs.js';
import { createTaskJobs, type TaskState } from './task-jobs.js';
import { actionRoute } from './action-routes.js';
import { MovesiftError } from '../shared/errors.js';
import { staticFile } from './static-files.js';

const NOT_FOUND_CODES = new Set(['E_AUDIT_UNKNOWN', 'E_UNKNOWN_APPLY', 'E_AUDIT_NOT_SAMPLED']);

export interface HandlerOptions {
  /** The ledger to open at start; without it the app starts on its start screen. */
  ledger?: string;
  /** Vite's output folder for the renderer; without it only /api answers. */
  rendererDir?: string;
  /** Analysis threads for scans started from the app (default: cores - 1). */
  scanWorkers?: number;
  /** The scan function (tests pass a slow or failing one). */
  scan?: typeof scan;
}

export interface Handler {
  handle(request: Request): Promise<Response>;
  close(): Promise<void>;
}

export function createHandler(o: HandlerOptions): Handler {
  let db: Ledger | null = null;
  let open: OpenLedger | null = null;
  const jobs = createScanJobs(o.scan);
  const tasks = createTaskJobs();
  const workers = o.scanWorkers ?? Math.max(1, Math.min(8, os.availableParallelism() - 1));

  function openFile(file: string, create: boolean): void {
    if (file === open?.file) return; // already open
    if (jobs.running()) throw new HttpError(409, ApiErrorCode.scanRunning, 'a scan is running; open another ledger when it has finished or been stopped');
    if (tasks.running()) throw new HttpError(409, ApiErrorCode.taskRunning, 'an apply, undo or cut is running; open another ledger when it has finished');
    if (create && existsSync(file) && file !== open?.file) {
      // A new ledger may not land on an existing file; opening an existing one is the other button.
      throw new HttpError(409, 'E_LEDGER_EXISTS', `${file}: already exists; open it instead, or choose a new name`);
    }
    const next = openLedger(file, { create });
    db?.close();
    db = next;
    open = { file, q: createReviewQueries(next), cacheDir: cacheDirOf(file) };
  }
  if (o.ledger) openFile(path.resolve(o.ledger), false);

  const user = (() => {
    try {
      return os.userInfo().username;
    } catch {
      return '';
    }
  })();
  const session = (): SessionInfo => ({ ledger: open?.file ?? null, name: open ? path.basename(open.file) : null, engineVersion: ENGINE_VERSION, user, scan: jobs.state(), task: tasks.state() });

  async function route(req: Request): Promise<Response> {
    const url = new URL(req.url);
    const parts = url.pathname.split('/').filter(Boolean).map(decodeURIComponent);
    const method = req.method.toUpperCase();
    const only = (m: string): void => {
      if (method !== m && !(m === 'GET' && method === 'HEAD')) throw new HttpError(405, ApiErrorCode.methodNotAllowed, `${method} is not allowed on ${url.pathname}`);
    };
    if (parts[0] !== 'api') {
      only('GET');
      return staticFile(o.rendererDir, url.pathname);
    }
    const [, what, sub] = parts;
    if (what === 'session' && parts.length === 2) {
      if (method === 'POST') {
        const body = await readJson(req);
        openFile(userPath('ledger', body.ledger), body.create === true);
      } else only('GET');
      return json(session());
    }
    if (what === 'scans' && parts.length === 2) {
      only('POST');
      const body = await readJson(req);
      if (!Array.isArray(body.folders) || body.folders.length === 0 || body.folders.length > 64) throw badRequest('folders: wanted 1-64 folder paths');
      const folders = body.folders.map((f, i) => userPath(`folders[${i}]`, f));
      if (body.ledger !== undefined) {
        const file = userPath('ledger', body.ledger);
        openFile(file, !existsSync(file));
      }
      if (!open) throw new HttpError(409, ApiErrorCode.noLedger, 'no ledger is open: give one to scan into');
      for (const f of folders) if (!existsSync(f)) throw new HttpError(400, 'E_FOLDER_MISSING', `${f}: no such folder`);
      return json(jobs.start({ ledger: open.file, folders, flow: body.flow === true, deploymentCut: body.deploymentCut === true, workers }), 202);
    }
    if (what === 'scans' && sub === 'stop' && parts.length === 3) {
      only('POST');
      jobs.stop();
      return json(jobs.state());
    }
    if (what === 'scans' && sub === 'progress' && parts.length === 3) {
      only('GET');
      return eventStream<ScanJobState>(jobs.state(), (send) => jobs.subscribe(send));
    }
    if (what === 'tasks' && sub === 'progress' && parts.length === 3) {
      only('GET');
      return eventStream<TaskState>(tasks.state(), (send) => tasks.subscribe(send));
    }
    if (!open) throw new HttpError(409, ApiErrorCode.noLedger, 'no ledger is open: open one or scan a folder first');
    return (await actionRoute(req, parts, url, open.file, tasks, only)) ?? reviewRoute(req, parts, url, open, only);
  }

  return {
    async handle(req) {
      try {
        return await route(req);
      } catch (e) {
        if (e instanceof HttpError) return errorResponse(e.status, e.code, e.message);
        if (e instanceof URIError) return errorResponse(400, ApiErrorCode.badRequest, 'malformed percent-encoding in the path');
        const code = (e as { code?: string }).code;
        if (typeof code === 'string' && code.startsWith('E_LEDGER')) return errorResponse(code === 'E_LEDGER_MISSING' ? 404 : code === 'E_LEDGER_BUSY' ? 409 : 400, code, (e as Error).message);
        // A refusal from the layers below (a name clash, too few labels, nothing set aside...):
        // the request was understood, the ledger's state does not allow it.
        if (e instanceof MovesiftError) return errorResponse(NOT_FOUND_CODES.has(e.code) ? 404 : e.code === 'E_INVALID_ARGUMENT' || e.code === 'E_DEPLOYMENTS_TABLE' ? 400 : 409, e.code, e.message);
        throw e;
      }
    },
    async close() {
      await jobs.settle(true);
      await tasks.settle();
      db?.close();
      db = null;
    },
  };
}
