/** Worker thread: runs event tasks sent by the pool, one at a time, and posts plain results. */
import { parentPort } from 'node:worker_threads';
import { createTaskWorkspace, runEventTask, type EventTask } from './analyse-task.js';
import { safeOutcome } from './safe-outcome.js';

/** This thread's workspace: what it keeps from one event to the next. */
const workspace = createTaskWorkspace();

parentPort!.on('message', async (msg: { id: number; task: EventTask }) => {
  const outcome = await safeOutcome(msg.task, (t) => runEventTask(t, workspace));
  parentPort!.postMessage({ id: msg.id, outcome });
});
