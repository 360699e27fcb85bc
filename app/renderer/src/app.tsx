/**
 * The app: start screen, grid and one-event view, composed here (features do not import each
 * other). Every key press goes through one listener and the one key table; the handler below
 * says what each action does in the current place.
 */
import { useCallback, useEffect, useRef, useState } from 'react';
import type { Decision, SessionInfo } from '../../../src/shared/review-api';
import { api } from './shared/api';
import { ConfirmDialog, type ConfirmRequest } from './shared/confirm-dialog';
import { keepMovedQuestion, setAsideWarning, undoQuestion } from './shared/decision-warning';
import { count } from './shared/format';
import { actionFor, keyName, type Action, type Mode } from './shared/keys';
import { EMPTY_SELECTION, fromServer, toggle, type Selection } from './shared/selection';
import { DECISION_CYCLE, DEFAULT_FILTER, LIGHT_CYCLE, cycle, type ViewFilter } from './shared/view-filter';
import { EventGrid, type GridGeometry } from './features/grid/components/event-grid';
import { Toolbar } from './features/grid/components/toolbar';
import { useEventPages } from './features/grid/hooks/use-event-pages';
import { EventDetailView } from './features/detail/components/event-detail';
import { HelpOverlay } from './features/help/components/help-overlay';
import { StartScreen } from './features/start/components/start-screen';
import { useScanProgress } from './features/start/hooks/use-scan-progress';
import { ActPanel } from './features/act/components/act-panel';
import { AuditView } from './features/audit/components/audit-view';
import { CameraProblems, problemsOf, type Problem } from './shared/camera-problems';

const SCORE_STEP = 0.05;

export function App({ initial }: { initial: SessionInfo }) {
  const [session, setSession] = useState(initial);
  const [view, setView] = useState<'start' | 'grid' | 'detail' | 'audit' | 'act'>(initial.ledger ? 'grid' : 'start');
  const [help, setHelp] = useState(false);
  const [confirm, setConfirm] = useState<{ request: ConfirmRequest; run(): void } | null>(null);
  const [filter, setFilter] = useState<ViewFilter>(DEFAULT_FILTER);
  const [focus, setFocus] = useState(0);
  const [anchor, setAnchor] = useState<number | null>(null);
  const [selection, setSelection] = useState<Selection>(EMPTY_SELECTION);
  const [heat, setHeat] = useState(false);
  const [who, setWho] = useState(() => localStorage.getItem('movesift.who') ?? initial.user);
  const [message, setMessage] = useState<string>('Press ? for the keys.');
  const [deployments, setDeployments] = useState<string[]>([]);
  const [problems, setProblems] = useState<Problem[]>([]);
  const geometry = useRef<GridGeometry>({ cols: 1, rowsInView: 1 });
  const detailActions = useRef<((a: Action) => boolean) | null>(null);
  const auditActions = useRef<((a: Action) => boolean) | null>(null);
  const scan = useScanProgress(initial.scan);
  const pages = useEventPages(filter, session.ledger);
  const total = pages.total ?? 0;

  useEffect(() => localStorage.setItem('movesift.who', who), [who]);
  useEffect(() => {
    if (session.ledger) void api.deployments().then((rows) => setDeployments([...new Set(rows.map((r) => r.deployment))].sort()));
    if (session.ledger) void api.health().then((h) => setProblems(problemsOf(h)), () => setProblems([]));
  }, [session.ledger, scan?.status]);
  const scanStatus = scan?.status;
  useEffect(() => {
    if (scanStatus && scanStatus !== 'running') pages.reload();
  }, [scanStatus]); // eslint-disable-line react-hooks/exhaustive-deps

  const changeFilter = (f: ViewFilter) => {
    setFilter(f);
    setFocus(0);
    setAnchor(null);
    setSelection(EMPTY_SELECTION);
  };
  const moveTo = (i: number, extend = false) => {
    const next = Math.max(0, Math.min(total - 1, i));
    if (extend) {
      const a = anchor ?? focus;
      setAnchor(a);
      let s = selection;
      for (let j = Math.min(a, next); j <= Math.max(a, next); j++) {
        const c = pages.get(j);
        if (c) s = toggle(s, c.id, c.verdict, true);
      }
      setSelection(s);
    } else setAnchor(null);
    setFocus(next);
  };

  // Decisions and undos go to the ledger one after another, in key order: an undo pressed
  // straight after a decision must find that decision written, never overtake it.
  const writes = useRef<Promise<unknown>>(Promise.resolve());
  const inOrder = <T,>(f: () => Promise<T>): Promise<T> => {
    const next = writes.current.then(f, f);
    writes.current = next.catch(() => {});
    return next;
  };

  const record = async (decision: Decision, ids: string[], advance: boolean) => {
    const r = await api.decide(ids, decision, ids.length > 1 ? 'bulk' : 'single', who);
    pages.patchDecision(new Set(ids), decision);
    setSelection(EMPTY_SELECTION);
    const word = decision === 'keep' ? 'Kept' : 'Set aside';
    setMessage(`${word} ${count(r.written)} event${r.written === 1 ? '' : 's'} (${count(r.changed)} changed). Nothing was moved; u undoes.`);
    if (advance && filter.decision === undefined) setFocus((f) => Math.min(total - 1, f + 1));
  };

  const decide = (decision: Decision) => {
    const card = pages.get(focus);
    const bulk = selection.ids.size > 0 && view === 'grid';
    const ids = bulk ? [...selection.ids] : card ? [card.id] : [];
    if (!ids.length) return;
    const verdicts = bulk ? selection.verdicts : { 'likely-blank': 0, unsure: 0, motion: 0, [card!.verdict]: 1 };
    const run = () => void inOrder(() => record(decision, ids, !bulk)).catch((e: Error) => setMessage(`Not recorded: ${e.message}`));
    const warning = decision === 'set-aside' ? setAsideWarning(ids.length, verdicts) : null;
    if (warning) return setConfirm({ request: warning, run });
    if (decision === 'set-aside') return run();
    // Keeping what an apply already moved: ask, then put the files back. The check is queued with
    // the writes, so an undo typed straight after a keep still finds the keep written first.
    void inOrder(async () => {
      const m = await api.moved(ids);
      if (!m.files) return record('keep', ids, !bulk);
      setConfirm({
          request: keepMovedQuestion(ids.length, m.events.length, m.files),
          run: () =>
            void inOrder(async () => {
              await record('keep', ids, !bulk);
              try {
                await api.restoreEvents(m.events);
                setMessage(`Kept ${count(ids.length)}; putting back ${count(m.files)} file${m.files === 1 ? '' : 's'} from the set-aside folder (m shows the progress).`);
              } catch (e) {
                setMessage(`Kept ${count(ids.length)}, but their files could not be put back now (${(e as Error).message}); keep them again later to retry.`);
              }
            }).catch((e: Error) => setMessage(`Not recorded: ${e.message}`)),
      });
    }).catch((e: Error) => setMessage(`Not recorded: ${e.message}`));
  };

  // Undo takes back the latest batch of decisions, whoever made it; one made by someone else or
  // by a command is named and asked about first.
  const undo = async () => {
    const last = await api.lastBatch();
    if (!last) return setMessage('Nothing left to undo.');
    const own = last.source !== 'command' && last.who === who;
    if (own) return takeBack(last.batch);
    setConfirm({ request: undoQuestion(last), run: () => void inOrder(() => takeBack(last.batch)).catch((e: Error) => setMessage(`Undo failed: ${e.message}`)) });
  };
  const takeBack = async (batch: string) => {
    const r = await api.undo(who, batch);
    if (!r.batch) return setMessage('Nothing left to undo.');
    for (const d of [null, 'keep', 'set-aside'] as const) {
      const ids = new Set(r.events.filter((e) => e.decision === d).map((e) => e.id));
      if (ids.size) pages.patchDecision(ids, d);
    }
    setMessage(`Undid the last decisions on ${count(r.restored)} event${r.restored === 1 ? '' : 's'}.`);
  };

  const selectShown = async () => {
    const r = await api.shownIds(filter);
    setSelection(fromServer(r.ids, r.verdicts));
    setMessage(`Selected all ${count(r.ids.length)} events shown.`);
  };

  const act = (a: Action): void => {
    const { cols, rowsInView } = geometry.current;
    if ((view === 'detail' || view === 'audit') && detailActions.current?.(a)) return;
    if (view === 'audit' && auditActions.current?.(a)) return;
    switch (a) {
      case 'move-left': return moveTo(focus - 1);
      case 'move-right': return moveTo(focus + 1);
      case 'move-up': return moveTo(focus - cols);
      case 'move-down': return moveTo(focus + cols);
      case 'move-first': return moveTo(0);
      case 'move-last': return moveTo(total - 1);
      case 'page-up': return moveTo(focus - cols * rowsInView);
      case 'page-down': return moveTo(focus + cols * rowsInView);
      case 'extend-left': return moveTo(focus - 1, true);
      case 'extend-right': return moveTo(focus + 1, true);
      case 'extend-up': return moveTo(focus - cols, true);
      case 'extend-down': return moveTo(focus + cols, true);
      case 'toggle-select': {
        const c = pages.get(focus);
        if (c) setSelection((s) => toggle(s, c.id, c.verdict));
        return;
      }
      case 'select-shown': return void selectShown();
      case 'clear-selection': return setSelection(EMPTY_SELECTION);
      case 'keep': return decide('keep');
      case 'set-aside': return decide('set-aside');
      case 'undo': return void inOrder(undo).catch((e: Error) => setMessage(`Undo failed: ${e.message}`));
      case 'open': return pages.get(focus) ? setView('detail') : undefined;
      case 'close': return help ? setHelp(false) : setView('grid');
      case 'verdict-blank': return changeFilter({ ...filter, verdict: 'likely-blank' });
      case 'verdict-unsure': return changeFilter({ ...filter, verdict: 'unsure' });
      case 'verdict-motion': return changeFilter({ ...filter, verdict: 'motion' });
      case 'verdict-any': return changeFilter({ ...filter, verdict: undefined });
      case 'cycle-decision': return changeFilter({ ...filter, decision: cycle(DECISION_CYCLE, filter.decision) });
      case 'cycle-light': return changeFilter({ ...filter, light: cycle(LIGHT_CYCLE, filter.light) });
      case 'cycle-deployment': return changeFilter({ ...filter, deployment: cycle([undefined, ...deployments], filter.deployment) });
      case 'score-lower': return changeFilter({ ...filter, scoreMax: Math.max(SCORE_STEP, Math.round(((filter.scoreMax ?? 1) - SCORE_STEP) * 100) / 100) });
      case 'score-raise': {
        const up = Math.round(((filter.scoreMax ?? 1) + SCORE_STEP) * 100) / 100;
        return changeFilter({ ...filter, scoreMax: up >= 1 ? undefined : up });
      }
      case 'floor-lower': {
        const down = Math.round(((filter.scoreMin ?? 0) - SCORE_STEP) * 100) / 100;
        return changeFilter({ ...filter, scoreMin: down <= 0 ? undefined : down });
      }
      case 'floor-raise': return changeFilter({ ...filter, scoreMin: Math.min(1 - SCORE_STEP, Math.round(((filter.scoreMin ?? 0) + SCORE_STEP) * 100) / 100) });
      case 'toggle-order': return changeFilter({ ...filter, sort: filter.sort === 'time' ? 'score' : 'time' });
      case 'reverse-order': return changeFilter({ ...filter, desc: !filter.desc });
      case 'toggle-heat': return setHeat((h) => !h);
      case 'help': return setHelp(true);
      case 'start-screen': return setView('start');
      case 'audit-mode': return setView('audit');
      case 'act-mode': return setView('act');
      case 'event-prev': return moveTo(focus - 1);
      case 'event-next': return moveTo(focus + 1);
      case 'confirm-yes': {
        const c = confirm;
        setConfirm(null);
        return c?.run();
      }
      case 'confirm-no': {
        setConfirm(null);
        return setMessage('Nothing changed.');
      }
    }
  };
  const actRef = useRef(act);
  actRef.current = act;
  const mode: Mode = confirm ? 'confirm' : help ? 'help' : view;
  const modeRef = useRef(mode);
  modeRef.current = mode;

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (e.ctrlKey || e.metaKey || e.altKey) return;
      const t = e.target as HTMLElement | null;
      if (t && (t.tagName === 'INPUT' || t.tagName === 'TEXTAREA' || t.tagName === 'SELECT')) {
        if (e.key === 'Escape') t.blur(); // the next Esc leaves the screen
        return;
      }
      const a = actionFor(modeRef.current, keyName(e));
      if (!a) return;
      e.preventDefault();
      e.stopPropagation();
      actRef.current(a);
    };
    window.addEventListener('keydown', onKey, { capture: true });
    return () => window.removeEventListener('keydown', onKey, { capture: true });
  }, []);

  useEffect(() => {
    if (view === 'detail') pages.ensure(focus - 5, focus + 5);
  }, [view, focus, pages]);

  const onPick = useCallback((i: number, extend: boolean) => {
    setFocus(i);
    if (extend) actRef.current('toggle-select');
  }, []);
  const onOpen = useCallback((i: number) => {
    setFocus(i);
    setView('detail');
  }, []);
  const onGeometry = useCallback((g: GridGeometry) => {
    geometry.current = g;
  }, []);
  const bindActions = useCallback((fn: ((a: Action) => boolean) | null) => {
    detailActions.current = fn;
  }, []);
  const bindAudit = useCallback((fn: ((a: Action) => boolean) | null) => {
    auditActions.current = fn;
  }, []);
  const ask = useCallback((request: ConfirmRequest, run: () => void) => setConfirm({ request, run }), []);

  if (view === 'start' || !session.ledger) {
    return <StartScreen session={session} scan={scan} who={who} onWho={setWho} onSession={setSession} onReview={() => session.ledger && setView('grid')} />;
  }
  const current = pages.get(focus);
  return (
    <div className="app" data-mode={mode}>
      <div className="app-head">
        <Toolbar ledgerName={session.name} filter={filter} total={pages.total} selected={selection.ids.size} heat={heat} scan={scan} onHelp={() => setHelp(true)} />
        {view === 'grid' && <CameraProblems problems={problems} />}
      </div>
      {view === 'grid' && (total > 0 || pages.total === null ? (
        <EventGrid pages={pages} focus={focus} selected={selection.ids} heat={heat} onPick={onPick} onOpen={onOpen} onGeometry={onGeometry} />
      ) : (
        <div className="empty-note">No event matches these filters. Press 0 for every verdict, d / n / p to cycle the other filters.</div>
      ))}
      {view === 'audit' && <AuditView who={who} bindActions={bindAudit} renderEvent={(id, position) => <EventDetailView key={id} id={id} heat={heat} decision={undefined} position={position} problems={problems} bindActions={bindActions} />} />}
      {view === 'act' && <ActPanel who={who} initialTask={session.task} ask={ask} onChanged={() => pages.reload()} />}
      {view === 'detail' && current && <EventDetailView id={current.id} heat={heat} decision={current.decision} position={`${count(focus + 1)} of ${count(total)}`} problems={problems} bindActions={bindActions} onAct={act} />}
      <footer className="status-line" data-testid="status-line" role="status">
        {pages.error ? `Could not load events: ${pages.error}` : message}
      </footer>
      {help && <HelpOverlay onClose={() => setHelp(false)} />}
      {confirm && <ConfirmDialog request={confirm.request} onYes={() => act('confirm-yes')} onNo={() => act('confirm-no')} />}
    </div>
  );
}
