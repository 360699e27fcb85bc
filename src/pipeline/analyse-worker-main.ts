/** Worker thread: runs event tasks sent by the pool, one at a time, and posts plain results. */
import { parentPort } from 'node:worker_threads';
import { runEventTask, type EventTask } from './analyse-task.js';
import { safeOutcome } from './safe-outcome.js';

parentPort!.on('message', async (msg: { id: number; task: EventTask }) => {
  const outcome = await safeOutcome(msg.task, runEventTask);
  parentPort!.postMessage({ id: msg.id, outcome });
});
