/** Turns an unexpected exception while analysing one event into a recorded failure of that
 *  event, so one bad event never ends a scan of thousands. */
import type { EventTask, TaskOutcome } from './analyse-task.js';

export const ANALYSIS_FAILED = 'E_ANALYSIS_FAILED';

export async function safeOutcome(task: EventTask, run: (t: EventTask) => Promise<TaskOutcome>): Promise<TaskOutcome> {
  try {
    return await run(task);
  } catch (e) {
    const message = `analysis failed (${(e as Error)?.message ?? String(e)}); please report this with the file`;
    return { ok: false, eventId: task.eventId, failures: task.files.map((f) => ({ display: f.display, code: (e as { code?: string })?.code ?? ANALYSIS_FAILED, message: `${f.display}: ${message}`, stage: 'read' as const })) };
  }
}
