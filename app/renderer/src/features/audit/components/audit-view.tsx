/**
 * Audit mode: the sampled set-aside events one at a time, and one question, "is there an animal?"
 * (y / n). The report under it updates with every answer: animals found, the share of all
 * set-aside events that may hold one with its exact interval, and pass or fail against the
 * tolerance. Without an audit, it offers to draw one of the size the planner gives.
 */
import { useEffect, useState, type ReactNode } from 'react';
import type { AuditReport } from '../../../../../../src/shared/review-api';
import { api } from '../../../shared/api';
import type { Action } from '../../../shared/keys';
import { count } from '../../../shared/format';

interface Props {
  who: string;
  renderEvent(id: string, position: string): ReactNode;
  bindActions(fn: ((a: Action) => boolean) | null): void;
}

const pct = (v: number) => `${(100 * v).toFixed(2)}%`;

function Summary({ r }: { r: AuditReport }) {
  return (
    <div className={`audit-summary verdict-${r.verdict}`} data-testid="audit-summary" data-verdict={r.verdict}>
      <b>{r.verdict === 'incomplete' ? `${count(r.answered)} of ${count(r.sampleSize)} answered` : r.verdict === 'pass' ? 'PASS' : 'FAIL'}</b>
      <span>
        animals found {count(r.animals)} of {count(r.answered)}
      </span>
      <span>
        share of the {count(r.population)} set-aside events with an animal: {pct(r.share.estimate)} ({pct(r.share.lower)}–{pct(r.share.upper)}, {r.share.method})
      </span>
      <span>
        upper bound {pct(r.shareUpperOneSided)} vs tolerance {pct(r.tolerance)}
      </span>
    </div>
  );
}

export function AuditView({ who, renderEvent, bindActions }: Props) {
  const [report, setReport] = useState<AuditReport | null>(null);
  const [index, setIndex] = useState(0);
  const [loaded, setLoaded] = useState(false);
  const [form, setForm] = useState({ sample: '', strata: '1', tolerance: '0.01' });
  const [error, setError] = useState<string | null>(null);

  useEffect(() => {
    void api.audits().then(async (list) => {
      const open = [...list].reverse().find((a) => a.answered < a.sample_size) ?? list[list.length - 1];
      if (open) {
        const r = await api.audit(open.id);
        setReport(r);
        setIndex(Math.max(0, r.items.findIndex((i) => i.animal === null)));
      }
      setLoaded(true);
    });
    void api.auditPlan(0.01).then((p) => setForm((f) => ({ ...f, sample: f.sample || String(p.sample) })));
  }, []);

  useEffect(() => {
    if (!report) return bindActions(null);
    const n = report.items.length;
    const answer = (animal: boolean) => {
      const item = report.items[index];
      void api.answer(report.id, item.event_id, animal, who).then((r) => {
        setReport(r);
        const next = r.items.findIndex((it, i) => i > index && it.animal === null);
        setIndex(next >= 0 ? next : Math.min(n - 1, index + 1));
      }, (e: Error) => setError(e.message));
    };
    bindActions((a) => {
      if (a === 'audit-yes') return answer(true), true;
      if (a === 'audit-no') return answer(false), true;
      if (a === 'event-prev') return setIndex((i) => Math.max(0, i - 1)), true;
      if (a === 'event-next') return setIndex((i) => Math.min(n - 1, i + 1)), true;
      return false;
    });
    return () => bindActions(null);
  }, [report, index, who, bindActions]);

  if (!loaded) return <main className="audit">Loading…</main>;
  if (!report) {
    return (
      <main className="audit" data-testid="audit-draw">
        <h1>Audit the set-aside events</h1>
        <p>A random sample of the set-aside events, each answered only "animal present: yes or no", estimates how many animals were set aside. With none found in the planned number of checks, the miss rate is shown to be below the tolerance at 95% confidence.</p>
        {error && <p className="error-text">{error}</p>}
        <div className="row">
          <label>
            sample <input value={form.sample} onChange={(e) => setForm({ ...form, sample: e.target.value })} aria-label="sample size" />
          </label>
          <label>
            score bands <input value={form.strata} onChange={(e) => setForm({ ...form, strata: e.target.value })} aria-label="score bands" />
          </label>
          <label>
            tolerance <input value={form.tolerance} onChange={(e) => setForm({ ...form, tolerance: e.target.value })} aria-label="tolerance" />
          </label>
          <button type="button" className="button-main" onClick={() => void api.drawAudit({ sample: Number(form.sample), strata: Number(form.strata), tolerance: Number(form.tolerance), who }).then((r) => (setReport(r), setIndex(0)), (e: Error) => setError(e.message))}>
            Draw the sample
          </button>
        </div>
      </main>
    );
  }
  const item = report.items[index];
  return (
    <main className="audit" data-testid="audit-view" data-audit={report.id}>
      <div className="audit-head">
        <h1>Audit {report.id}</h1>
        <span className="audit-question">
          Is there an animal? <kbd>y</kbd> yes <kbd>n</kbd> no
        </span>
        <span data-testid="audit-answer">{item.animal === null ? 'not answered' : item.animal ? 'answered: animal' : 'answered: no animal'}</span>
      </div>
      <Summary r={report} />
      {error && <p className="error-text">{error}</p>}
      {renderEvent(item.event_id, `${index + 1} of ${report.items.length}`)}
    </main>
  );
}
