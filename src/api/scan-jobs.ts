/**
 * The scan started from the start screen: at most one at a time per process, run in the
 * background through the same pipeline as `movesift scan`, with its progress kept as one small
 * state object that listeners (the event stream) receive, at most every 150 ms while files go
 * by and at once when the phase or status changes.
 */
import { scan, type ScanSummary } from '../pipeline/scan.js';
import type { ScanProgress } from '../pipeline/progress.js';
import type { ScanJobState } from '../shared/review-api.js';
import { ApiErrorCode, HttpError } from './api-errors.js';

export type { ScanJobState };

export interface ScanStart {
  ledger: string;
  folders: string[];
  flow?: boolean;
  /** Let each deployment raise its likely-blank cut (scan.ts ScanOptions.deploymentCut). */
  deploymentCut?: boolean;
  workers: number;
}

const KEEP_ERRORS = 50;
const THROTTLE_MS = 150;

export function createScanJobs(run: typeof scan = scan) {
  let state: ScanJobState | null = null;
  let controller: AbortController | null = null;
  let finished: Promise<void> = Promise.resolve();
  const listeners = new Set<(s: ScanJobState) => void>();
  let timer: NodeJS.Timeout | null = null;
  let jobs = 0;

  const flush = (): void => {
    if (timer) clearTimeout(timer);
    timer = null;
    if (state) for (const l of listeners) l({ ...state, errors: [...state.errors] });
  };
  const later = (): void => {
    timer ??= setTimeout(flush, THROTTLE_MS);
  };

  function onProgress(p: ScanProgress): void {
    const s = state!;
    if (p.type === 'phase') {
      Object.assign(s, { phase: p.phase, done: 0, total: p.total ?? 0, skipped: p.skipped ?? s.skipped, rate: null, etaS: null, file: null });
      flush();
    } else if (p.type === 'progress') {
      Object.assign(s, { done: p.done, total: p.total, rate: p.rate ?? null, etaS: p.etaS ?? null, file: p.file ?? null });
      later();
    } else if (p.type === 'error') {
      s.errorCount++;
      s.errors.push({ file: p.file, code: p.code, message: p.message });
      if (s.errors.length > KEEP_ERRORS) s.errors.shift();
      later();
    }
  }

  return {
    state: (): ScanJobState | null => (state ? { ...state, errors: [...state.errors] } : null),
    running: (): boolean => state?.status === 'running',
    /** Starts a scan; refuses while one runs. Resolves once the scan is under way (its end is reported to listeners). */
    start(o: ScanStart): ScanJobState {
      if (state?.status === 'running') throw new HttpError(409, ApiErrorCode.scanRunning, 'a scan is already running; wait for it or stop it first');
      controller = new AbortController();
      state = { job: ++jobs, ledger: o.ledger, folders: o.folders, status: 'running', phase: null, done: 0, total: 0, skipped: 0, rate: null, etaS: null, file: null, errorCount: 0, errors: [], summary: null, failure: null };
      const s = state;
      finished = run({ roots: o.folders, ledger: o.ledger, flow: o.flow, deploymentCut: o.deploymentCut, workers: o.workers, signal: controller.signal, onProgress })
        .then((summary) => {
          Object.assign(s, { status: summary.stopped ? 'stopped' : 'done', summary, file: null });
        })
        .catch((e: unknown) => {
          Object.assign(s, { status: 'failed', failure: { code: (e as { code?: string }).code ?? 'E_SCAN_FAILED', message: (e as Error).message } });
        })
        .finally(flush);
      flush();
      return { ...s };
    },
    stop(): void {
      if (state?.status !== 'running') throw new HttpError(409, ApiErrorCode.noScan, 'no scan is running');
      controller?.abort();
    },
    subscribe(l: (s: ScanJobState) => void): () => void {
      listeners.add(l);
      return () => listeners.delete(l);
    },
    /** Waits for the current scan (stopping it first when asked); for shutdown and tests. */
    async settle(stop = false): Promise<void> {
      if (stop && state?.status === 'running') controller?.abort();
      await finished;
    },
  };
}

export type ScanJobs = ReturnType<typeof createScanJobs>;
