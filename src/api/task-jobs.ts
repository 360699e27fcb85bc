/**
 * The long operations started from the app other than scans (apply, undo, cut): one at a time,
 * run in the background, their progress kept as one small state object for the event stream.
 */
import { ApiErrorCode, HttpError } from './api-errors.js';

import type { TaskState } from '../shared/review-api.js';

export type { TaskState };

export type Report = (done: number, total: number, file: string | null) => void;

export function createTaskJobs() {
  let state: TaskState | null = null;
  let count = 0;
  let finished: Promise<void> = Promise.resolve();
  const listeners = new Set<(s: TaskState) => void>();
  let last = 0;
  const emit = (force = false): void => {
    const now = Date.now();
    if (!state || (!force && now - last < 150)) return;
    last = now;
    for (const l of listeners) l({ ...state });
  };
  return {
    state: (): TaskState | null => (state ? { ...state } : null),
    running: (): boolean => state?.status === 'running',
    start(kind: TaskState['kind'], run: (report: Report) => Promise<unknown>): TaskState {
      if (state?.status === 'running') throw new HttpError(409, ApiErrorCode.taskRunning, `a ${state.kind} is running; wait for it to finish`);
      state = { task: ++count, kind, status: 'running', done: 0, total: 0, file: null, result: null, failure: null };
      const s = state;
      finished = run((done, total, file) => {
        Object.assign(s, { done, total, file });
        emit();
      })
        .then((result) => Object.assign(s, { status: 'done', result, file: null }))
        .catch((e: unknown) => Object.assign(s, { status: 'failed', failure: { code: (e as { code?: string }).code ?? 'E_TASK_FAILED', message: (e as Error).message } }))
        .then(() => emit(true));
      emit(true);
      return { ...s };
    },
    subscribe(l: (s: TaskState) => void): () => void {
      listeners.add(l);
      return () => listeners.delete(l);
    },
    settle: () => finished,
  };
}

export type TaskJobs = ReturnType<typeof createTaskJobs>;
