/**
 * The statements behind audits: the set-aside population, a drawn audit and its items (one
 * transaction), the append-only answers (the latest per item counts), and their listing.
 */
import type { AuditItem } from '../shared/review-api.js';
import type { Ledger } from './open-ledger.js';

export interface AuditRow {
  id: number;
  created_at: string;
  who: string | null;
  seed: number;
  population: number;
  sample_size: number;
  tolerance: number;
  alpha: number;
  strata: string;
}

export type AuditItemRow = AuditItem;

export function createAuditStore(db: Ledger) {
  const s = {
    population: db.prepare<[], { event_id: string; score: number }>(
      "SELECT d.event_id, a.score FROM latest_decisions d JOIN analyses a ON a.event_id = d.event_id WHERE d.decision = 'set-aside' ORDER BY d.event_id",
    ),
    insertAudit: db.prepare('INSERT INTO audits (created_at, who, seed, population, sample_size, tolerance, alpha, strata) VALUES (?, ?, ?, ?, ?, ?, ?, ?)'),
    insertItem: db.prepare('INSERT INTO audit_items (audit_id, position, event_id, stratum) VALUES (?, ?, ?, ?)'),
    audit: db.prepare<[number], AuditRow>('SELECT * FROM audits WHERE id = ?'),
    latestAudit: db.prepare<[], AuditRow>('SELECT * FROM audits ORDER BY id DESC LIMIT 1'),
    audits: db.prepare<[], AuditRow & { answered: number; animals: number }>(
      `SELECT au.*, (SELECT count(DISTINCT event_id) FROM audit_answers WHERE audit_id = au.id) AS answered,
         (SELECT count(*) FROM audit_items i WHERE i.audit_id = au.id AND (SELECT animal FROM audit_answers x WHERE x.audit_id = au.id AND x.event_id = i.event_id ORDER BY x.id DESC LIMIT 1) = 1) AS animals
       FROM audits au ORDER BY au.id`,
    ),
    items: db.prepare<[number], AuditItemRow>(
      `SELECT i.position, i.event_id, i.stratum, a.score, a.verdict, x.animal, x.who, x.at
       FROM audit_items i
       LEFT JOIN analyses a ON a.event_id = i.event_id
       LEFT JOIN audit_answers x ON x.id = (SELECT max(id) FROM audit_answers WHERE audit_id = i.audit_id AND event_id = i.event_id)
       WHERE i.audit_id = ? ORDER BY i.position`,
    ),
    isItem: db.prepare<[number, string], { n: number }>('SELECT count(*) AS n FROM audit_items WHERE audit_id = ? AND event_id = ?'),
    answer: db.prepare('INSERT INTO audit_answers (audit_id, event_id, animal, who, at) VALUES (?, ?, ?, ?, ?)'),
  };
  return {
    population: () => s.population.all(),
    createAudit: db.transaction((a: Omit<AuditRow, 'id' | 'created_at'>, items: Array<{ event_id: string; stratum: number }>): number => {
      const id = Number(s.insertAudit.run(new Date().toISOString(), a.who, a.seed, a.population, a.sample_size, a.tolerance, a.alpha, a.strata).lastInsertRowid);
      items.forEach((it, i) => s.insertItem.run(id, i, it.event_id, it.stratum));
      return id;
    }),
    audit: (id?: number) => (id === undefined ? s.latestAudit.get() : s.audit.get(id)),
    audits: () => s.audits.all(),
    items: (id: number) => s.items.all(id),
    isItem: (id: number, eventId: string) => s.isItem.get(id, eventId)!.n > 0,
    answer: (id: number, eventId: string, animal: boolean, who: string | null) => void s.answer.run(id, eventId, animal ? 1 : 0, who, new Date().toISOString()),
  };
}

export type AuditStore = ReturnType<typeof createAuditStore>;
