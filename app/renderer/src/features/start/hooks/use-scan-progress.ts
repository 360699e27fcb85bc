/** The running (or last) scan's state, live from the progress stream. */
import { useEffect, useState } from 'react';
import type { ScanJobState } from '../../../../../../src/shared/review-api';
import { api } from '../../../shared/api';

export function useScanProgress(initial: ScanJobState | null): ScanJobState | null {
  const [state, setState] = useState(initial);
  useEffect(() => api.watchScan(setState), []);
  return state;
}
