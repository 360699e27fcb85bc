/**
 * Queries and writes behind the review handler: event pages with filters, one event whole,
 * previews and media by ledger id, deployment counts, and the append-only decisions log.
 */
import { randomUUID } from 'node:crypto';
import type { EventCalibration, EventCard, EventFilter, LastBatch, VerdictRule } from '../shared/review-api.js';
import type { Ledger } from './open-ledger.js';
import { healthRows } from './report-rows.js';

export type { EventCard, EventFilter };

/** The decision that counts per event (migration 2 keeps it from the append-only log). */
const LATEST = 'LEFT JOIN latest_decisions d ON d.event_id = e.id';
const LIGHT = "(SELECT m.light FROM event_media em JOIN media m ON m.id = em.media_id WHERE em.event_id = e.id ORDER BY em.position LIMIT 1)";

/** WHERE clause and arguments for a filter; shared by pages, counts and "all shown". */
function whereOf(f: Omit<EventFilter, 'sort' | 'desc' | 'offset' | 'limit'>): { w: string; args: unknown[] } {
  const where: string[] = [];
  const args: unknown[] = [];
  if (f.verdict) (where.push('a.verdict = ?'), args.push(f.verdict));
  if (f.deployment) (where.push('e.deployment_id = ?'), args.push(f.deployment));
  if (f.scoreMin !== undefined) (where.push('a.score >= ?'), args.push(f.scoreMin));
  if (f.scoreMax !== undefined) (where.push('a.score <= ?'), args.push(f.scoreMax));
  if (f.decision === 'none') where.push('d.decision IS NULL');
  else if (f.decision) (where.push('d.decision = ?'), args.push(f.decision));
  if (f.light) (where.push(`${LIGHT} = ?`), args.push(f.light));
  return { w: where.length ? `WHERE ${where.join(' AND ')}` : '', args };
}

/** Orders that match the migration 2 indexes, so a page deep in the grid is an index walk. */
function orderOf(f: Pick<EventFilter, 'sort' | 'desc'>): string {
  const dir = f.desc ? 'DESC' : 'ASC';
  return f.sort === 'score' ? `a.score ${dir}, a.event_id ${dir}` : `e.start_sort_ms ${dir}, e.deployment_id ${dir}, e.id ${dir}`;
}

export function createReviewQueries(db: Ledger) {
  const eventStmt = db.prepare<[string], EventCard & { analysis_id: number; detail: string; features: string; engine_version: string; analysis_width: number; analysis_height: number; rule: VerdictRule | null }>(
    `SELECT e.id, e.kind, e.deployment_id AS deployment, e.start_time AS start, e.end_time AS end, a.id AS analysis_id, a.score, a.verdict, a.rule, a.detail, a.features,
       a.engine_version, a.analysis_width, a.analysis_height, d.decision,
       (SELECT count(*) FROM event_media WHERE event_id = e.id) AS frames,
       (SELECT m.light FROM event_media em JOIN media m ON m.id = em.media_id WHERE em.event_id = e.id ORDER BY em.position LIMIT 1) AS light,
       NULL AS thumb, NULL AS heat
     FROM events e JOIN analyses a ON a.event_id = e.id ${LATEST} WHERE e.id = ?`,
  );
  const middleLight = db.prepare<[string, string], { light: string | null }>(
    'SELECT m.light FROM event_media em JOIN media m ON m.id = em.media_id WHERE em.event_id = ? AND em.position = (SELECT count(*) FROM event_media c WHERE c.event_id = ?) / 2',
  );
  const calibrationOf = db.prepare<[string, string], { status: EventCalibration['status']; cut: number; fitted_blank: number; usable: number; light: string }>(
    'SELECT status, cut, fitted_blank, usable, light FROM deployment_calibrations WHERE deployment_id = ? AND light = ?',
  );
  const mediaOfEvent = db.prepare<[string], { id: number; position: number; rel_path: string; kind: string; capture_time: string; width: number; height: number; duration_s: number | null }>(
    'SELECT m.id, em.position, m.rel_path, m.kind, m.capture_time, m.width, m.height, m.duration_s FROM event_media em JOIN media m ON m.id = em.media_id WHERE em.event_id = ? ORDER BY em.position',
  );
  const windowsOf = db.prepare<[number], { start_s: number; end_s: number; score: number }>('SELECT start_s, end_s, score FROM windows WHERE analysis_id = ? ORDER BY start_s');
  const previewsOf = db.prepare<[number], { kind: string; position: number; width: number; height: number; time_s: number | null }>('SELECT kind, position, width, height, time_s FROM previews WHERE analysis_id = ? ORDER BY kind, position');
  const previewPath = db.prepare<[string, string, number], { path: string }>('SELECT p.path FROM previews p JOIN analyses a ON a.id = p.analysis_id WHERE a.event_id = ? AND p.kind = ? AND p.position = ?');
  // Where an apply moved the file, the journal knows where it is now (a move's `dest`, while it
  // is `moved`): the audit exists to look at exactly those files.
  const mediaFile = db.prepare<[number], { root: string; rel_path: string; kind: string; size: number; format: string | null; moved_to: string | null }>(
    `SELECT r.path AS root, m.rel_path, m.kind, m.size, m.format,
       (SELECT v.dest FROM moves v WHERE v.media_id = m.id AND v.state = 'moved' ORDER BY v.id DESC LIMIT 1) AS moved_to
     FROM media m JOIN roots r ON r.id = m.root_id WHERE m.id = ?`,
  );
  const snapshot = db.prepare<[string], { score: number; verdict: string; engine_version: string; decision: string | null }>(`SELECT a.score, a.verdict, a.engine_version, d.decision FROM events e JOIN analyses a ON a.event_id = e.id ${LATEST} WHERE e.id = ?`);
  const insertDecision = db.prepare('INSERT INTO decisions (event_id, decision, source, who, at, score, verdict, engine_version, batch, note) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)');
  const lastBatch = db.prepare<[], { batch: string }>("SELECT batch FROM decisions WHERE source != 'undo' AND batch IS NOT NULL AND batch NOT IN (SELECT note FROM decisions WHERE source = 'undo' AND note IS NOT NULL) ORDER BY id DESC LIMIT 1");
  const batchFacts = db.prepare<[string], { source: string; who: string | null; at: string; decision: string; n: number }>(
    'SELECT source, who, max(at) AS at, decision, count(*) AS n FROM decisions WHERE batch = ? AND source != \'undo\' GROUP BY source, who, decision ORDER BY n DESC LIMIT 1',
  );
  const batchRows = db.prepare<[string], { id: number; event_id: string }>('SELECT id, event_id FROM decisions WHERE batch = ? ORDER BY id');
  const decisionBefore = db.prepare<[string, number], { decision: string | null }>('SELECT decision FROM decisions WHERE event_id = ? AND id < ? ORDER BY id DESC LIMIT 1');
  const summary = db.prepare<[], { deployment: string; verdict: string; decision: string | null; n: number }>(
    `SELECT e.deployment_id AS deployment, a.verdict, d.decision, count(*) AS n FROM events e JOIN analyses a ON a.event_id = e.id ${LATEST} GROUP BY 1, 2, 3 ORDER BY 1`,
  );

  return {
    /** One page; `total` only when asked (a count walks every matching row). */
    listEvents(f: EventFilter, withTotal = true): { total?: number; events: EventCard[] } {
      const { w, args } = whereOf(f);
      const total = withTotal ? (db.prepare(`SELECT count(*) AS n FROM events e JOIN analyses a ON a.event_id = e.id ${LATEST} ${w}`).get(...args) as { n: number }).n : undefined;
      const events = db
        .prepare(
          `SELECT e.id, e.kind, e.deployment_id AS deployment, e.start_time AS start, e.end_time AS end, a.score, a.verdict, d.decision,
             (SELECT count(*) FROM event_media WHERE event_id = e.id) AS frames,
             ${LIGHT} AS light,
             (SELECT p.position FROM previews p WHERE p.analysis_id = a.id AND p.kind = 'frame' ORDER BY p.position LIMIT 1) AS thumb,
             (SELECT p.position FROM previews p WHERE p.analysis_id = a.id AND p.kind = 'heat' LIMIT 1) AS heat
           FROM events e JOIN analyses a ON a.event_id = e.id ${LATEST} ${w} ORDER BY ${orderOf(f)} LIMIT ? OFFSET ?`,
        )
        .all(...args, f.limit, f.offset) as EventCard[];
      return { total, events };
    },
    /** Every id the filter shows, in grid order (for a decision on "all shown"). */
    idsOf(f: Omit<EventFilter, 'offset' | 'limit'>): string[] {
      const { w, args } = whereOf(f);
      return (db.prepare(`SELECT e.id FROM events e JOIN analyses a ON a.event_id = e.id ${LATEST} ${w} ORDER BY ${orderOf(f)}`).pluck().all(...args) as string[]);
    },
    event(id: string) {
      const e = eventStmt.get(id);
      if (!e) return undefined;
      const { analysis_id, detail, features, rule, ...card } = e;
      // The calibration of the event's deployment and light mode (the light of its middle file,
      // as pass two groups it: pipeline/deployment-pass.ts).
      const light = card.kind === 'clip' ? undefined : (middleLight.get(id, id)?.light ?? 'unknown');
      const c = light === undefined ? undefined : calibrationOf.get(card.deployment, light);
      const calibration: EventCalibration | null = c ? { status: c.status, cut: c.cut, fittedBlank: c.fitted_blank, usable: c.usable, light: c.light } : null;
      return { ...card, rule: rule ?? 'model', calibration, detail: JSON.parse(detail) as unknown, features: JSON.parse(features) as unknown, media: mediaOfEvent.all(id), windows: windowsOf.all(analysis_id), previews: previewsOf.all(analysis_id) };
    },
    /** Ids of analysed events matching every given condition (for scripted decisions). */
    matchingIds(m: { verdict?: string; scoreBelow?: number; deployment?: string; ids?: string[] }): string[] {
      const where: string[] = [];
      const args: unknown[] = [];
      if (m.verdict) (where.push('a.verdict = ?'), args.push(m.verdict));
      if (m.scoreBelow !== undefined) (where.push('a.score < ?'), args.push(m.scoreBelow));
      if (m.deployment) (where.push('e.deployment_id = ?'), args.push(m.deployment));
      if (m.ids?.length) (where.push(`e.id IN (${m.ids.map(() => '?').join(', ')})`), args.push(...m.ids));
      const w = where.length ? `WHERE ${where.join(' AND ')}` : '';
      return (db.prepare(`SELECT e.id FROM events e JOIN analyses a ON a.event_id = e.id ${w} ORDER BY e.deployment_id, e.start_sort_ms, e.id`).all(...args) as Array<{ id: string }>).map((r) => r.id);
    },
    /** How many events the filter shows per verdict (what a bulk decision on "all shown" would touch). */
    verdictCountsOf(f: Omit<EventFilter, 'sort' | 'desc' | 'offset' | 'limit'>): Record<string, number> {
      const { w, args } = whereOf(f);
      const rows = db.prepare(`SELECT a.verdict, count(*) AS n FROM events e JOIN analyses a ON a.event_id = e.id ${LATEST} ${w} GROUP BY a.verdict`).all(...args) as Array<{ verdict: string; n: number }>;
      return Object.fromEntries(rows.map((r) => [r.verdict, r.n]));
    },
    previewPath: (eventId: string, kind: string, position: number) => previewPath.get(eventId, kind, position)?.path,
    mediaFile: (id: number) => mediaFile.get(id),
    summary: () => summary.all(),
    /** What deployment health is judged from (report-rows.ts). */
    healthRows: () => healthRows(db),
    /** Appends one decision per event (one batch, one transaction); unknown ids are returned, not written. */
    decide: db.transaction((ids: string[], decision: 'keep' | 'set-aside', source: string, who: string | null) => {
      const batch = randomUUID();
      const at = new Date().toISOString();
      const missing: string[] = [];
      let changed = 0;
      for (const id of ids) {
        const s = snapshot.get(id);
        if (!s) {
          missing.push(id);
          continue;
        }
        if (s.decision !== decision) changed++;
        insertDecision.run(id, decision, source, who, at, s.score, s.verdict, s.engine_version, batch, null);
      }
      return { batch, written: ids.length - missing.length, changed, missing };
    }),
    /** The batch an undo would take back now: who made it, how (the app or a command), when. */
    lastBatch(): LastBatch | null {
      const b = lastBatch.get();
      if (!b) return null;
      const f = batchFacts.get(b.batch)!;
      return { batch: b.batch, source: f.source, who: f.who, at: f.at, decision: f.decision as LastBatch['decision'], events: batchRows.all(b.batch).length };
    },
    /** Undoes the latest batch not yet undone: appends, per event, the decision it had before.
     *  Given `expected`, only if that is still the latest batch (someone else may have decided
     *  since the person was asked): `stale` otherwise, and nothing is written. */
    undoLast: db.transaction((who: string | null, expected?: string) => {
      const b = lastBatch.get();
      if (expected !== undefined && b?.batch !== expected) return { batch: null, restored: 0, events: [], stale: true };
      if (!b) return { batch: null, restored: 0, events: [] };
      const at = new Date().toISOString();
      const rows = batchRows.all(b.batch);
      const events: Array<{ id: string; decision: string | null }> = [];
      for (const r of rows) {
        const prev = decisionBefore.get(r.event_id, r.id)?.decision ?? null;
        const s = snapshot.get(r.event_id);
        insertDecision.run(r.event_id, prev, 'undo', who, at, s?.score ?? null, s?.verdict ?? null, s?.engine_version ?? null, null, b.batch);
        events.push({ id: r.event_id, decision: prev });
      }
      return { batch: b.batch, restored: rows.length, events };
    }),
  };
}

export type ReviewQueries = ReturnType<typeof createReviewQueries>;
