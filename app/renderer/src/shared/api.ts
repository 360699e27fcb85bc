/**
 * The renderer's one client layer: every call to the backend goes through here, by relative URL,
 * so the same code runs against the loopback server (browser mode) and the custom protocol
 * (Electron). Errors arrive as {code, message} and are thrown as ApiFailure with that code.
 */
import type { ApplyInfo, ApplyPlan, AuditReport, CalibrationResult, DecideResult, Decision, DeploymentCount, EventDetail, EventPage, LastBatch, ScanJobState, SessionInfo, TaskState, UndoResult } from '../../../../src/shared/review-api';
import type { DeploymentHealth } from '../../../../src/shared/health';
import type { ViewFilter } from './view-filter';

export class ApiFailure extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

/** The session's request key, handed out by the loopback server in a response header that only
 *  this page can read, and sent back with every request that changes something (the header's
 *  name is KEY_HEADER in src/api/loopback-server.ts). Electron's protocol hands none out and
 *  needs none. */
let requestKey: string | null = null;
const KEY_HEADER = 'x-movesift-key';

async function call<T>(url: string, init?: RequestInit): Promise<T> {
  if (init?.method === 'POST' && requestKey === null) await fetch('api/session').then((r) => (requestKey = r.headers.get(KEY_HEADER)));
  const r = await fetch(url, init?.method === 'POST' && requestKey ? { ...init, headers: { ...(init.headers as Record<string, string>), [KEY_HEADER]: requestKey } } : init);
  requestKey = r.headers.get(KEY_HEADER) ?? requestKey;
  const text = await r.text();
  const body = text ? JSON.parse(text) : null;
  if (!r.ok) throw new ApiFailure(r.status, body?.code ?? 'E_HTTP', body?.message ?? `${r.status} ${r.statusText}`);
  return body as T;
}

const post = (body: unknown): RequestInit => ({ method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });

export function filterQuery(f: ViewFilter): URLSearchParams {
  const q = new URLSearchParams();
  if (f.verdict) q.set('verdict', f.verdict);
  if (f.decision) q.set('decision', f.decision);
  if (f.light) q.set('light', f.light);
  if (f.deployment) q.set('deployment', f.deployment);
  if (f.scoreMin !== undefined) q.set('score_min', String(f.scoreMin));
  if (f.scoreMax !== undefined) q.set('score_max', String(f.scoreMax));
  q.set('sort', f.sort);
  q.set('order', f.desc ? 'desc' : 'asc');
  return q;
}

export const api = {
  session: () => call<SessionInfo>('api/session'),
  openLedger: (ledger: string, create: boolean) => call<SessionInfo>('api/session', post({ ledger, create })),
  startScan: (folders: string[], ledger?: string, deploymentCut = false) => call<ScanJobState>('api/scans', post({ folders, ledger, deploymentCut })),
  stopScan: () => call<ScanJobState>('api/scans/stop', post({})),
  page(f: ViewFilter, offset: number, limit: number, withTotal: boolean): Promise<EventPage> {
    const q = filterQuery(f);
    q.set('offset', String(offset));
    q.set('limit', String(limit));
    q.set('total', withTotal ? '1' : '0');
    return call<EventPage>(`api/events?${q}`);
  },
  shownIds: (f: ViewFilter) => call<{ ids: string[]; verdicts: Record<string, number> }>(`api/events/ids?${filterQuery(f)}`),
  event: (id: string) => call<EventDetail>(`api/events/${id}`),
  deployments: () => call<DeploymentCount[]>('api/deployments'),
  health: () => call<DeploymentHealth[]>('api/health'),
  decide: (events: string[], decision: Decision, source: 'single' | 'bulk', who: string) => call<DecideResult>('api/decisions', post({ events, decision, source, who })),
  undo: (who: string, batch?: string) => call<UndoResult>('api/decisions/undo', post({ who, batch })),
  lastBatch: () => call<LastBatch | null>('api/decisions/last'),
  previewUrl: (id: string, kind: 'frame' | 'heat', position: number) => `api/events/${id}/preview/${kind}/${position}`,
  mediaUrl: (id: number) => `api/media/${id}`,

  applyPlan: (to: string) => call<ApplyPlan>(`api/apply/plan?${new URLSearchParams({ to })}`),
  startApply: (to: string, copy: boolean, who: string) => call<TaskState>('api/apply', post({ to, copy, who })),
  applies: () => call<ApplyInfo[]>('api/applies'),
  undoApply: (apply?: number) => call<TaskState>('api/undo', post({ apply })),
  /** Puts back the files of these events from the set-aside folder (a task). */
  restoreEvents: (events: string[]) => call<TaskState>('api/undo', post({ events })),
  moved: (events: string[]) => call<{ events: string[]; files: number; applies: number[] }>(`api/moved?${new URLSearchParams({ events: events.join(',') })}`),
  auditPlan: (tolerance: number) => call<{ sample: number }>(`api/audits/plan?tolerance=${tolerance}`),
  audits: () => call<Array<{ id: number; sample_size: number; population: number; answered: number }>>('api/audits'),
  drawAudit: (o: { sample: number; strata: number; tolerance: number; who: string }) => call<AuditReport>('api/audits', post(o)),
  audit: (id: number) => call<AuditReport>(`api/audits/${id}`),
  answer: (id: number, event: string, animal: boolean, who: string) => call<AuditReport>(`api/audits/${id}/answers`, post({ event, animal, who })),
  calibrate: (recall: number, apply: boolean, who: string) => call<CalibrationResult>('api/calibrate', post({ recall, apply, who })),
  exportData: (o: { format: 'csv' | 'camtrap-dp'; out: string; utcOffset?: string; deployments?: string; who: string; force?: boolean }) => call<{ out: string }>('api/export', post(o)),
  cut: (out: string, exact: boolean) => call<TaskState>('api/cut', post({ out, exact })),

  watchScan: (onState: (s: ScanJobState) => void): (() => void) => watchStream('api/scans/progress', onState),
  watchTasks: (onState: (s: TaskState) => void): (() => void) => watchStream('api/tasks/progress', onState),
};

/** Follows a server-sent event stream, reconnecting after a second when it drops; returns a
 *  function that stops following. Read with fetch (not EventSource) so it also works over
 *  Electron's custom protocol. */
function watchStream<T>(url: string, onState: (s: T) => void): () => void {
  const ctl = new AbortController();
  (async () => {
    while (!ctl.signal.aborted) {
      try {
        const r = await fetch(url, { signal: ctl.signal });
        const reader = r.body!.pipeThrough(new TextDecoderStream()).getReader();
        let buf = '';
        for (;;) {
          const { value, done } = await reader.read();
          if (done) break;
          buf += value;
          let cut: number;
          while ((cut = buf.indexOf('\n\n')) >= 0) {
            const block = buf.slice(0, cut);
            buf = buf.slice(cut + 2);
            const data = block.split('\n').filter((l) => l.startsWith('data: ')).map((l) => l.slice(6)).join('\n');
            if (data) onState(JSON.parse(data) as T);
          }
        }
      } catch {
        /* reconnect below unless stopped */
      }
      if (!ctl.signal.aborted) await new Promise((r) => setTimeout(r, 1000));
    }
  })();
  return () => ctl.abort();
}
