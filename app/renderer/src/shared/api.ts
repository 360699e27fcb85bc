/**
 * The renderer's one client layer: every call to the backend goes through here, by relative URL,
 * so the same code runs against the loopback server (browser mode) and the custom protocol
 * (Electron). Errors arrive as {code, message} and are thrown as ApiFailure with that code.
 */
import type { DecideResult, Decision, DeploymentCount, EventDetail, EventPage, ScanJobState, SessionInfo, UndoResult } from '../../../../src/shared/review-api';
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

async function call<T>(url: string, init?: RequestInit): Promise<T> {
  const r = await fetch(url, init);
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
  if (f.scoreMax !== undefined) q.set('score_max', String(f.scoreMax));
  q.set('sort', f.sort);
  q.set('order', f.desc ? 'desc' : 'asc');
  return q;
}

export const api = {
  session: () => call<SessionInfo>('api/session'),
  openLedger: (ledger: string, create: boolean) => call<SessionInfo>('api/session', post({ ledger, create })),
  startScan: (folders: string[], ledger?: string) => call<ScanJobState>('api/scans', post({ folders, ledger })),
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
  decide: (events: string[], decision: Decision, source: 'single' | 'bulk', who: string) => call<DecideResult>('api/decisions', post({ events, decision, source, who })),
  undo: (who: string) => call<UndoResult>('api/decisions/undo', post({ who })),
  previewUrl: (id: string, kind: 'frame' | 'heat', position: number) => `api/events/${id}/preview/${kind}/${position}`,
  mediaUrl: (id: number) => `api/media/${id}`,

  /** Follows the scan's progress stream; returns a function that stops following. Reads the
   *  event stream with fetch (not EventSource) so it also works over Electron's custom protocol. */
  watchScan(onState: (s: ScanJobState) => void): () => void {
    const ctl = new AbortController();
    (async () => {
      while (!ctl.signal.aborted) {
        try {
          const r = await fetch('api/scans/progress', { signal: ctl.signal });
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
              if (data) onState(JSON.parse(data) as ScanJobState);
            }
          }
        } catch {
          /* reconnect below unless stopped */
        }
        if (!ctl.signal.aborted) await new Promise((r) => setTimeout(r, 1000));
      }
    })();
    return () => ctl.abort();
  },
};
