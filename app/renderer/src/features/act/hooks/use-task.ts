/** The running (or last) apply, undo or cut, live from its progress stream. */
import { useEffect, useState } from 'react';
import type { TaskState } from '../../../../../../src/shared/review-api';
import { api } from '../../../shared/api';

export function useTask(initial: TaskState | null): TaskState | null {
  const [state, setState] = useState(initial);
  useEffect(() => api.watchTasks(setState), []);
  return state;
}
