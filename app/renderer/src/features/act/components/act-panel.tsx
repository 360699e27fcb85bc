/**
 * Acting on the decisions: move set-aside media into a set-aside folder (what would move is shown
 * first, and the move asks before it starts), put them back, calibrate the likely-blank threshold
 * from the decisions, export, and cut clips' activity windows. Long operations show their progress.
 */
import { useEffect, useState } from 'react';
import type { ApplyInfo, ApplyPlan, CalibrationResult, TaskState } from '../../../../../../src/shared/review-api';
import { api } from '../../../shared/api';
import type { ConfirmRequest } from '../../../shared/confirm-dialog';
import { count } from '../../../shared/format';
import { useTask } from '../hooks/use-task';

interface Props {
  who: string;
  initialTask: TaskState | null;
  ask(request: ConfirmRequest, run: () => void): void;
  onChanged(): void;
}

const mb = (b: number) => `${(b / 1e6).toFixed(1)} MB`;

/** One line on what a finished task did, from its result. */
function resultText(t: TaskState): string {
  const r = (t.result ?? {}) as { moved?: number; skipped?: unknown[]; restored?: number; problems?: unknown[]; files?: number; out?: string };
  if (t.kind === 'apply') return `${count(r.moved ?? 0)} files set aside${r.skipped?.length ? `, ${count(r.skipped.length)} left in place (changed or missing since the scan)` : ''}`;
  if (t.kind === 'undo') return `${count(r.restored ?? 0)} files put back${r.problems?.length ? `, ${count(r.problems.length)} could not be (changed or missing)` : ''}`;
  return `${count(r.files ?? 0)} window files in ${r.out}`;
}

function TaskLine({ task }: { task: TaskState | null }) {
  if (!task) return null;
  const pct = task.total ? Math.round((100 * task.done) / task.total) : 0;
  return (
    <div className="task-line" data-testid="task" data-status={task.status} data-kind={task.kind}>
      <div className="progress" role="progressbar" aria-valuenow={pct} aria-valuemin={0} aria-valuemax={100}>
        <span style={{ width: `${task.status === 'running' ? pct : 100}%` }} />
      </div>
      <p>
        {task.kind}: {task.status === 'running' ? `${count(task.done)} of ${count(task.total)}${task.file ? ` · ${task.file}` : ''}` : task.status}
        {task.status === 'done' && <span> · {resultText(task)}</span>}
        {task.failure && <span className="error-text"> ({task.failure.code}) {task.failure.message}</span>}
      </p>
    </div>
  );
}

export function ActPanel({ who, initialTask, ask, onChanged }: Props) {
  const task = useTask(initialTask);
  const desktop = window.movesiftDesktop;
  const [to, setTo] = useState('');
  const [copy, setCopy] = useState(false);
  const [plan, setPlan] = useState<ApplyPlan | null>(null);
  const [applies, setApplies] = useState<ApplyInfo[]>([]);
  const [recall, setRecall] = useState('0.99');
  const [cal, setCal] = useState<CalibrationResult | null>(null);
  // An export's refusal is shown beside the fields that fix it, not at the top of the panel.
  const [exportError, setExportError] = useState<string | null>(null);
  const [exp, setExp] = useState({ format: 'camtrap-dp' as 'csv' | 'camtrap-dp', out: '', utcOffset: '', deployments: '', force: false });
  const [cutOut, setCutOut] = useState('');
  const [message, setMessage] = useState<string | null>(null);
  const refresh = () => void api.applies().then(setApplies).catch(() => {});
  useEffect(refresh, []);
  useEffect(() => {
    if (task && task.status !== 'running') {
      refresh();
      onChanged();
    }
  }, [task?.status]); // eslint-disable-line react-hooks/exhaustive-deps
  const act = (f: () => Promise<unknown>) => () => {
    setMessage(null);
    f().catch((e: Error & { code?: string }) => setMessage(`${e.message}${e.code ? ` (${e.code})` : ''}`));
  };
  const pick = async (set: (p: string) => void) => {
    const p = await desktop?.pickFolders();
    if (p?.[0]) set(p[0]);
  };
  const busy = task?.status === 'running';

  return (
    <main className="act" data-testid="act-panel">
      <h1>Act on the decisions</h1>
      {message && <p className="error-text" role="alert">{message}</p>}
      <TaskLine task={task} />
      <section className="start-panel">
        <h2>Move set-aside media</h2>
        <p className="card-dim">Each file goes into the set-aside folder below a folder named after its scan root, checked and journalled; nothing is overwritten or deleted, and Undo puts everything back.</p>
        <div className="row">
          <input value={to} onChange={(e) => (setTo(e.target.value), setPlan(null))} placeholder="/path/to/set-aside" aria-label="set-aside folder" />
          {desktop && <button type="button" onClick={() => void pick((p) => (setTo(p), setPlan(null)))}>Choose…</button>}
        </div>
        <label>
          <input type="checkbox" checked={copy} onChange={(e) => setCopy(e.target.checked)} /> copy instead of moving (the originals stay)
        </label>
        <div className="dialog-buttons">
          <button type="button" onClick={act(async () => setPlan(await api.applyPlan(to)))} disabled={!to || busy}>
            Show what would move
          </button>
          {plan && plan.files > 0 && (
            <button
              type="button"
              className="button-risk"
              disabled={busy}
              onClick={() =>
                ask(
                  { title: `${copy ? 'Copy' : 'Move'} ${count(plan.files)} files?`, lines: [`${count(plan.files)} files (${mb(plan.bytes)}) of ${count(plan.events)} set-aside events go into ${to}.`, 'Every move is checked and journalled; Undo below puts them back.'], yesLabel: `Yes, ${copy ? 'copy' : 'move'} ${count(plan.files)} files` },
                  act(async () => {
                    await api.startApply(to, copy, who);
                    setPlan(null);
                  }),
                )
              }
            >
              {copy ? 'Copy' : 'Move'} {count(plan.files)} files…
            </button>
          )}
        </div>
        {plan && (
          <div data-testid="apply-plan">
            <p>
              {plan.files ? `${count(plan.files)} files, ${mb(plan.bytes)}, of ${count(plan.events)} set-aside events would ${copy ? 'be copied' : 'move'}:` : 'No set-aside media left to move.'}
            </p>
            <ul className="mono plan-list">
              {plan.moves.map((m) => (
                <li key={m.source}>
                  {m.source} → {m.dest}
                </li>
              ))}
              {plan.files > plan.moves.length && <li>… and {count(plan.files - plan.moves.length)} more</li>}
            </ul>
          </div>
        )}
        {applies.length > 0 && (
          <table className="applies" data-testid="applies">
            <tbody>
              {applies.map((a) => (
                <tr key={a.id}>
                  <td>apply {a.id}</td>
                  <td>{a.started_at.slice(0, 16).replace('T', ' ')}</td>
                  <td>{a.who}</td>
                  <td className="mono">{a.target}</td>
                  <td>{a.status}</td>
                  <td>
                    {count(a.moved)} files set aside now ({mb(a.bytes)})
                  </td>
                  <td>
                    {a.moved > 0 && (
                      <button type="button" disabled={busy} onClick={act(() => api.undoApply(a.id))}>
                        Undo apply {a.id}
                      </button>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
      <section className="start-panel">
        <h2>Calibrate the likely-blank threshold</h2>
        <p className="card-dim">From the events people kept or set aside (and audit answers): the highest threshold whose recall on the kept events reaches the target with 95% confidence.</p>
        <div className="row">
          <input value={recall} onChange={(e) => setRecall(e.target.value)} aria-label="target recall" />
          <button type="button" onClick={act(async () => setCal(await api.calibrate(Number(recall), false, who)))}>Propose</button>
        </div>
        {cal && (
          <div data-testid="calibration">
            <p>
              Threshold {cal.threshold.toFixed(4)}: recall {(100 * cal.recall).toFixed(2)}% on {count(cal.animals)} labelled animals (at least {(100 * cal.recallLower).toFixed(2)}% with 95% confidence); {count(cal.wouldBeBlank)} events would be likely-blank (now {count(cal.blankNow)}), {count(cal.undecidedChanges)} undecided events change verdict.
            </p>
            {!cal.applied && cal.undecidedChanges > 0 && (
              <button type="button" onClick={() => ask({ title: `Re-verdict ${count(cal.undecidedChanges)} undecided events?`, lines: ['Only verdicts change; no decision is made and nothing moves.'], yesLabel: 'Yes, re-verdict' }, act(async () => (setCal(await api.calibrate(Number(recall), true, who)), onChanged())))}>
                Re-verdict undecided events…
              </button>
            )}
          </div>
        )}
      </section>
      <section className="start-panel">
        <h2>Export</h2>
        <div className="row">
          <select value={exp.format} onChange={(e) => setExp({ ...exp, format: e.target.value as 'csv' | 'camtrap-dp' })} aria-label="export format">
            <option value="camtrap-dp">Camtrap DP 1.0.2 package (a folder)</option>
            <option value="csv">CSV, one row per media file</option>
          </select>
          <input value={exp.out} onChange={(e) => setExp({ ...exp, out: e.target.value })} placeholder={exp.format === 'csv' ? '/path/to/result.csv' : '/path/to/package-folder'} aria-label="export destination" />
        </div>
        {exp.format === 'camtrap-dp' && (
          <div className="row">
            <input value={exp.utcOffset} onChange={(e) => setExp({ ...exp, utcOffset: e.target.value })} placeholder="UTC offset of the cameras, e.g. +02:00" aria-label="UTC offset" />
            <input value={exp.deployments} onChange={(e) => setExp({ ...exp, deployments: e.target.value })} placeholder="deployments table (CSV) with coordinates" aria-label="deployments table" />
          </div>
        )}
        <label className="row">
          <input type="checkbox" checked={exp.force} onChange={(e) => setExp({ ...exp, force: e.target.checked })} aria-label="replace an earlier export" />
          Replace an earlier export at this place (a ledger or a photo is never replaced)
        </label>
        <div className="dialog-buttons">
          <button
            type="button"
            disabled={!exp.out}
            onClick={act(async () => {
              setExportError(null);
              try {
                setMessage(`Exported to ${(await api.exportData({ format: exp.format, out: exp.out, utcOffset: exp.utcOffset || undefined, deployments: exp.deployments || undefined, who, force: exp.force || undefined })).out}.`);
              } catch (e) {
                setExportError(`${(e as Error).message}${(e as { code?: string }).code ? ` (${(e as { code?: string }).code})` : ''}`);
              }
            })}
          >
            Export
          </button>
        </div>
        {exportError && (
          <div className="error-text export-error" role="alert" data-testid="export-error">
            {exportError.split('\n').map((l, i) => (
              <div key={i}>{l.trim()}</div>
            ))}
          </div>
        )}
      </section>
      <section className="start-panel">
        <h2>Cut clips into activity windows</h2>
        <div className="row">
          <input value={cutOut} onChange={(e) => setCutOut(e.target.value)} placeholder="/path/to/window-clips" aria-label="folder for window clips" />
          <button type="button" disabled={!cutOut || busy} onClick={act(() => api.cut(cutOut, false))}>
            Cut
          </button>
        </div>
      </section>
      <p className="card-dim">Esc goes back to the grid.</p>
    </main>
  );
}
