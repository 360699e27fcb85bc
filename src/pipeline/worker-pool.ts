/**
 * A fixed pool of worker threads for event analysis. The motion kernels are synchronous
 * JavaScript, so threads are what lets a scan use more than one core. Tasks and results are
 * small plain objects (paths in, numbers out); frames are decoded inside the worker and never
 * cross threads. A worker that dies is replaced and its event is reported as failed.
 */
import { Worker } from 'node:worker_threads';
import type { EventTask, TaskOutcome } from './analyse-task.js';
import { ANALYSIS_FAILED } from './safe-outcome.js';

interface Slot {
  worker: Worker;
  busy?: { id: number; task: EventTask; resolve: (o: TaskOutcome) => void };
}

export interface WorkerPool {
  size: number;
  run(task: EventTask): Promise<TaskOutcome>;
  close(): Promise<void>;
}

export function createWorkerPool(size: number): WorkerPool {
  const url = new URL('./analyse-worker.mjs', import.meta.url);
  const slots: Slot[] = [];
  const queue: Array<{ task: EventTask; resolve: (o: TaskOutcome) => void }> = [];
  let nextId = 1;
  let closing = false;
  const spawn = (): Slot => {
    const slot: Slot = { worker: new Worker(url) };
    slot.worker.on('message', (m: { id: number; outcome: TaskOutcome }) => {
      const b = slot.busy;
      slot.busy = undefined;
      if (b && b.id === m.id) b.resolve(m.outcome);
      pump();
    });
    slot.worker.on('error', (e) => fail(slot, e));
    slot.worker.on('exit', (code) => {
      if (!closing) fail(slot, new Error(`worker exited with code ${code}`));
    });
    return slot;
  };
  const fail = (slot: Slot, e: Error): void => {
    const b = slot.busy;
    slot.busy = undefined;
    const i = slots.indexOf(slot);
    if (i >= 0 && !closing) {
      void slot.worker.terminate();
      slots[i] = spawn();
    }
    if (b) b.resolve({ ok: false, eventId: b.task.eventId, failures: b.task.files.map((f) => ({ display: f.display, code: ANALYSIS_FAILED, message: `${f.display}: analysis worker failed (${e.message})`, stage: 'read' })) });
    pump();
  };
  const pump = (): void => {
    for (const s of slots) {
      if (s.busy || !queue.length) continue;
      const q = queue.shift()!;
      s.busy = { id: nextId++, ...q };
      s.worker.postMessage({ id: s.busy.id, task: q.task });
    }
  };
  for (let i = 0; i < size; i++) slots.push(spawn());
  return {
    size,
    run: (task) =>
      new Promise((resolve) => {
        queue.push({ task, resolve });
        pump();
      }),
    async close() {
      closing = true;
      await Promise.all(slots.map((s) => s.worker.terminate()));
    },
  };
}
