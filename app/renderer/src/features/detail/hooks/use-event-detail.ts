/** Loads one event whole (frames, blobs, windows, previews) when the detail view opens it. */
import { useEffect, useState } from 'react';
import type { EventDetail } from '../../../../../../src/shared/review-api';
import { api } from '../../../shared/api';

export function useEventDetail(id: string | null): { event: EventDetail | null; error: string | null } {
  const [state, setState] = useState<{ id: string | null; event: EventDetail | null; error: string | null }>({ id: null, event: null, error: null });
  useEffect(() => {
    if (!id) return;
    let live = true;
    api
      .event(id)
      .then((event) => live && setState({ id, event, error: null }))
      .catch((e: Error) => live && setState({ id, event: null, error: e.message }));
    return () => {
      live = false;
    };
  }, [id]);
  return state.id === id ? state : { event: null, error: null };
}
