/**
 * The grid's data: a sparse cache of event pages for the current filter. Only pages near what is
 * on screen are fetched, so a 100,000-event ledger costs a few hundred cards in memory; the total
 * is asked for once per filter. Decisions patch cached cards in place, unless the filter depends
 * on decisions, in which case the pages are fetched again.
 */
import { useCallback, useEffect, useRef, useState } from 'react';
import type { Decision, EventCard } from '../../../../../../src/shared/review-api';
import { api } from '../../../shared/api';
import { filterKey, type ViewFilter } from '../../../shared/view-filter';

export const PAGE = 200;

export interface EventPages {
  total: number | null;
  get(index: number): EventCard | undefined;
  /** Fetches the pages covering [from, to) that are not cached or on the way. */
  ensure(from: number, to: number): void;
  patchDecision(ids: ReadonlySet<string>, decision: Decision | null): void;
  reload(): void;
  error: string | null;
  /** Bumped whenever cards arrive or change, for components that read through get(). */
  version: number;
}

export function useEventPages(filter: ViewFilter, ledgerKey: string | null): EventPages {
  const key = `${ledgerKey}|${filterKey(filter)}`;
  const pages = useRef(new Map<number, EventCard[]>());
  const pending = useRef(new Set<number>());
  const generation = useRef(0);
  const [total, setTotal] = useState<number | null>(null);
  const [version, setVersion] = useState(0);
  const [error, setError] = useState<string | null>(null);
  const filterRef = useRef(filter);
  filterRef.current = filter;

  const fetchPage = useCallback((p: number, withTotal: boolean) => {
    const gen = generation.current;
    pending.current.add(p);
    api
      .page(filterRef.current, p * PAGE, PAGE, withTotal)
      .then((r) => {
        if (gen !== generation.current) return; // the filter changed meanwhile
        pages.current.set(p, r.events);
        if (r.total !== undefined) setTotal(r.total);
        setError(null);
        setVersion((v) => v + 1);
      })
      .catch((e: Error) => gen === generation.current && setError(e.message))
      .finally(() => gen === generation.current && pending.current.delete(p));
  }, []);

  const reset = useCallback(() => {
    generation.current++;
    pages.current = new Map();
    pending.current = new Set();
    setTotal(null);
    setVersion((v) => v + 1);
    if (ledgerKey) fetchPage(0, true);
  }, [fetchPage, ledgerKey]);

  useEffect(reset, [key]); // eslint-disable-line react-hooks/exhaustive-deps

  const ensure = useCallback(
    (from: number, to: number) => {
      if (total === null) return;
      const last = Math.min(to, total) - 1;
      for (let p = Math.floor(Math.max(0, from) / PAGE); p <= Math.floor(last / PAGE); p++) {
        if (!pages.current.has(p) && !pending.current.has(p)) fetchPage(p, false);
      }
    },
    [fetchPage, total],
  );

  const get = useCallback((i: number) => pages.current.get(Math.floor(i / PAGE))?.[i % PAGE], []);

  const patchDecision = useCallback(
    (ids: ReadonlySet<string>, decision: Decision | null) => {
      if (filterRef.current.decision !== undefined) return reset(); // membership changed
      // New card objects, not mutated ones: the cards are memoised on their props.
      for (const list of pages.current.values()) list.forEach((c, i) => ids.has(c.id) && (list[i] = { ...c, decision }));
      setVersion((v) => v + 1);
    },
    [reset],
  );

  return { total, get, ensure, patchDecision, reload: reset, error, version };
}
