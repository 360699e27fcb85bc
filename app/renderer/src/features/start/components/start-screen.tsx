/**
 * Where a session begins: open an existing ledger, or scan folders into a ledger (a new one, or
 * the one open now) and watch the scan go. On the desktop the native pickers fill the paths; in a
 * browser the paths are typed.
 */
import { useState } from 'react';
import type { ScanJobState, SessionInfo } from '../../../../../../src/shared/review-api';
import { api } from '../../../shared/api';
import { count } from '../../../shared/format';

interface Props {
  session: SessionInfo;
  scan: ScanJobState | null;
  who: string;
  onWho(name: string): void;
  onSession(s: SessionInfo): void;
  onReview(): void;
}

const eta = (s: number | null) => (s === null || !Number.isFinite(s) ? '' : s < 90 ? `${Math.round(s)} s left` : `${Math.round(s / 60)} min left`);

function ScanProgressPanel({ scan, onReview }: { scan: ScanJobState; onReview(): void }) {
  const pct = scan.total ? Math.round((scan.done / scan.total) * 100) : 0;
  return (
    <section className="start-panel scan-panel" data-testid="scan-panel" data-status={scan.status}>
      <h2>
        Scan {scan.status === 'running' ? `in progress: ${scan.phase ?? 'starting'}` : scan.status}
      </h2>
      <div className="progress" role="progressbar" aria-valuenow={pct} aria-valuemin={0} aria-valuemax={100}>
        <span style={{ width: `${scan.status === 'done' ? 100 : pct}%` }} />
      </div>
      <p>
        {scan.phase === 'read' && `Reading ${count(scan.done)} of ${count(scan.total)} files`}
        {scan.phase === 'analyse' && `Screening ${count(scan.done)} of ${count(scan.total)} events${scan.skipped ? ` (${count(scan.skipped)} unchanged, skipped)` : ''}`}
        {scan.rate ? ` · ${scan.rate.toFixed(1)} per s · ${eta(scan.etaS)}` : ''}
      </p>
      {scan.file && <p className="mono card-dim">{scan.file}</p>}
      {scan.summary && (
        <p data-testid="scan-summary">
          {count(scan.summary.events)} events: {count(scan.summary.verdicts['likely-blank'] ?? 0)} likely blank, {count(scan.summary.verdicts.unsure ?? 0)} unsure, {count(scan.summary.verdicts.motion ?? 0)} motion. Nothing was moved or deleted.
        </p>
      )}
      {scan.failure && (
        <p className="error-text">
          The scan failed ({scan.failure.code}): {scan.failure.message}
        </p>
      )}
      {scan.errorCount > 0 && (
        <details>
          <summary>{count(scan.errorCount)} file(s) could not be screened; they are kept, never set aside</summary>
          <ul className="mono">
            {scan.errors.map((e, i) => (
              <li key={i}>
                {e.file}: {e.code} {e.message}
              </li>
            ))}
          </ul>
        </details>
      )}
      <div className="dialog-buttons">
        {scan.status === 'running' && (
          <button type="button" onClick={() => void api.stopScan()}>
            Stop after the current event
          </button>
        )}
        <button type="button" className="button-main" onClick={onReview} data-testid="review-button">
          {scan.status === 'running' ? 'Review what is screened so far' : 'Review'}
        </button>
      </div>
    </section>
  );
}

export function StartScreen({ session, scan, who, onWho, onSession, onReview }: Props) {
  const desktop = window.movesiftDesktop;
  const [ledger, setLedger] = useState(session.ledger ?? '');
  const [newLedger, setNewLedger] = useState('');
  const [folders, setFolders] = useState('');
  const [deploymentCut, setDeploymentCut] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const act = (f: () => Promise<unknown>) => () => {
    setError(null);
    f().catch((e: Error & { code?: string }) => setError(`${e.message}${e.code ? ` (${e.code})` : ''}`));
  };
  const open = act(async () => {
    const path = desktop ? await desktop.pickLedger() : ledger;
    if (!path) return;
    onSession(await api.openLedger(path, false));
    onReview();
  });
  const startScan = act(async () => {
    const list = desktop ? await desktop.pickFolders() : folders.split('\n').map((f) => f.trim()).filter(Boolean);
    if (!list.length) throw new Error('give at least one folder to scan');
    const target = desktop && !session.ledger ? await desktop.chooseNewLedger() : newLedger.trim() || session.ledger;
    if (!target) throw new Error('give a ledger file to scan into');
    await api.startScan(list, target, deploymentCut);
    onSession(await api.session());
  });
  return (
    <main className="start" data-testid="start-screen">
      <h1>movesift</h1>
      <p className="start-lede">Screens camera-trap bursts and survey clips by motion. Nothing is moved or deleted until you apply your decisions.</p>
      {error && <p className="error-text" role="alert">{error}</p>}
      <div className="start-columns">
        <section className="start-panel">
          <h2>Open a ledger</h2>
          {!desktop && <input value={ledger} onChange={(e) => setLedger(e.target.value)} placeholder="/path/to/survey.ledger" aria-label="ledger path" />}
          <div className="dialog-buttons">
            <button type="button" className="button-main" onClick={open}>
              Open{desktop ? '…' : ''}
            </button>
            {session.ledger && (
              <button type="button" onClick={onReview}>
                Back to {session.name}
              </button>
            )}
          </div>
        </section>
        <section className="start-panel">
          <h2>Scan folders</h2>
          {!desktop && (
            <>
              <textarea value={folders} onChange={(e) => setFolders(e.target.value)} placeholder={'/media/card/DCIM\n/data/reef-2026'} aria-label="folders to scan, one per line" rows={3} />
              <input value={newLedger} onChange={(e) => setNewLedger(e.target.value)} placeholder={session.ledger ? `into ${session.ledger}` : '/path/to/new.ledger'} aria-label="ledger to scan into" />
            </>
          )}
          <label className="check-row">
            <input type="checkbox" checked={deploymentCut} onChange={(e) => setDeploymentCut(e.target.checked)} data-testid="deployment-cut" />
            <span>
              Let each deployment raise its own likely-blank cut. More false triggers are called likely blank, and some low-scoring animals with them: about one animal in 30 on
              scenes it was not fitted on. Off unless you tick it; every call it makes is marked for a look.
            </span>
          </label>
          <div className="dialog-buttons">
            <button type="button" className="button-main" onClick={startScan} disabled={scan?.status === 'running'}>
              Scan{desktop ? '…' : ''}
            </button>
          </div>
        </section>
        <section className="start-panel">
          <h2>Your name</h2>
          <input value={who} onChange={(e) => onWho(e.target.value)} aria-label="your name, recorded with each decision" />
          <p className="card-dim">Recorded with every decision you make.</p>
        </section>
      </div>
      {scan && <ScanProgressPanel scan={scan} onReview={onReview} />}
    </main>
  );
}
