/**
 * Grows a scanned ledger to many events by copying its analysed events under new ids and
 * shifted times, reusing their media rows and preview files. Used only to measure the review
 * grid at 100,000 events (`npm run bench:review`); a copied event is marked by its input hash
 * `synthetic`, so no scan mistakes one for real media.
 */
import type { Ledger } from './open-ledger.js';

export function fillSynthetic(db: Ledger, target: number): number {
  const seeds = db
    .prepare<[], { id: string; deployment_id: string; kind: string; start_time: string; end_time: string; start_sort_ms: number; analysis_id: number }>(
      "SELECT e.id, e.deployment_id, e.kind, e.start_time, e.end_time, e.start_sort_ms, a.id AS analysis_id FROM events e JOIN analyses a ON a.event_id = e.id WHERE e.input_hash != 'synthetic' ORDER BY e.start_sort_ms",
    )
    .all();
  if (!seeds.length) throw new Error('the ledger holds no analysed events to copy');
  const have = (db.prepare('SELECT count(*) AS n FROM events').get() as { n: number }).n;
  const insertEvent = db.prepare("INSERT INTO events (id, deployment_id, kind, start_time, end_time, start_sort_ms, input_hash) VALUES (?, ?, ?, ?, ?, ?, 'synthetic')");
  const copyMedia = db.prepare('INSERT INTO event_media (event_id, position, media_id) SELECT ?, position, media_id FROM event_media WHERE event_id = ?');
  const copyAnalysis = db.prepare(
    `INSERT INTO analyses (event_id, scan_id, engine_version, param_hash, input_hash, analysis_width, analysis_height, score, verdict, features, detail, created_at)
     SELECT ?, scan_id, engine_version, param_hash, 'synthetic', analysis_width, analysis_height, ?, ?, features, detail, created_at FROM analyses WHERE id = ?`,
  );
  const copyPreviews = db.prepare('INSERT INTO previews (analysis_id, kind, position, path, width, height, time_s) SELECT ?, kind, position, path, width, height, time_s FROM previews WHERE analysis_id = ?');
  const copyWindows = db.prepare('INSERT INTO windows (analysis_id, start_s, end_s, score) SELECT ?, start_s, end_s, score FROM windows WHERE analysis_id = ?');
  const DAY_MS = 86_400_000;
  let made = 0;
  db.transaction(() => {
    for (let n = have; n < target; n++) {
      const s = seeds[n % seeds.length];
      const shift = Math.floor(n / seeds.length) * DAY_MS;
      const id = 'e' + (0x900000000000 + n).toString(16).padStart(12, '0');
      const iso = (t: string): string => new Date(Date.parse(t) + shift).toISOString().replace('.000Z', 'Z');
      insertEvent.run(id, s.deployment_id, s.kind, iso(s.start_time), iso(s.end_time), s.start_sort_ms + shift);
      copyMedia.run(id, s.id);
      // Spread the scores so score sorts and filters meet a realistic distribution.
      const score = ((n * 2654435761) % 1000) / 1000;
      const verdict = score < 0.1 ? 'likely-blank' : score < 0.9 ? 'unsure' : 'motion';
      const a = copyAnalysis.run(id, score, verdict, s.analysis_id).lastInsertRowid as number;
      copyPreviews.run(a, s.analysis_id);
      copyWindows.run(a, s.analysis_id);
      made++;
    }
  })();
  return made;
}
