/**
 * The routes that act on decisions, over the open ledger: apply (a dry-run plan first, then the
 * moves as a background task), undo, the list of applies, audits (draw, answer, report),
 * calibration, exports and activity-window clips. Paths the person types (a set-aside folder, an
 * export destination) are taken as folders to write into; no route returns a file's content by
 * path.
 *
 *   GET  /api/apply/plan?to=<folder>          what apply would move, and how many bytes
 *   POST /api/apply {to, copy?, who?}          start apply (task)
 *   GET  /api/applies                          every apply and what it has set aside now
 *   POST /api/undo {apply?, events?}           start undo of one apply or all, or of these events' files (task)
 *   GET  /api/moved?events=<id,...>            which of these events have files in a set-aside folder
 *   GET  /api/audits                           audits with their answered counts
 *   GET  /api/audits/plan?tolerance&alpha      checks needed with no animal found
 *   POST /api/audits {sample, strata?, tolerance?, seed?, who?}
 *   GET  /api/audits/:id                       the report, with its items and their answers
 *   POST /api/audits/:id/answers {event, animal, who?}
 *   POST /api/calibrate {recall, apply?, who?}
 *   POST /api/export {format, out, utcOffset?, deployments?, projectTitle?, who?, force?}
 *   POST /api/cut {out, exact?}                start cutting activity windows (task)
 */
import path from 'node:path';
import { mkdirSync } from 'node:fs';
import { openLedger } from '../ledger/open-ledger.js';
import { createMoveStore } from '../ledger/move-store.js';
import { createAuditStore } from '../ledger/audit-store.js';
import { clipWindows, exportDeployments, exportEvents, exportMedia } from '../ledger/export-rows.js';
import { applyDecisions } from '../pipeline/apply.js';
import { undoApply } from '../pipeline/undo-apply.js';
import { answerAudit, drawAudit, loadAuditReport, setAsideCount, zeroMissPlan } from '../pipeline/audit.js';
import { calibrate } from '../pipeline/calibrate.js';
import { mediaCsv } from '../pipeline/export-csv.js';
import { buildCamtrap, writePackage } from '../pipeline/export-camtrap.js';
import { checkOutput, writeOutput } from '../pipeline/output-guard.js';
import { readDeploymentsTable } from '../pipeline/deployments-table.js';
import { cutWindows } from '../pipeline/cut-windows.js';
import { ENGINE_VERSION } from '../pipeline/engine-version.js';
import { ApiErrorCode, HttpError, badRequest, json } from './api-errors.js';
import { EVENT_ID_RE, eventIds, readJson, userPath, who } from './request-params.js';
import type { TaskJobs } from './task-jobs.js';
import { deploymentsHealth } from '../pipeline/report.js';
import { healthRows } from '../ledger/report-rows.js';

function num(v: unknown, name: string, lo: number, hi: number, integer = false): number {
  const x = typeof v === 'string' && v !== '' ? Number(v) : v;
  if (typeof x !== 'number' || !Number.isFinite(x) || x < lo || x > hi || (integer && !Number.isInteger(x))) throw badRequest(`${name}: wanted ${integer ? 'integer' : 'number'} ${lo}-${hi}, got ${JSON.stringify(v)}`);
  return x;
}
const optional = <T>(v: unknown, f: () => T): T | undefined => (v === undefined || v === null || v === '' ? undefined : f());

export async function actionRoute(req: Request, parts: string[], url: URL, ledger: string, tasks: TaskJobs, only: (m: string) => void): Promise<Response | undefined> {
  const [, what, id, sub] = parts;
  const q = url.searchParams;
  if (what === 'apply' && id === 'plan' && parts.length === 3) {
    only('GET');
    const s = await applyDecisions({ ledger, to: userPath('to', q.get('to')), dryRun: true });
    return json({ files: s.planned.length, bytes: s.bytes, events: new Set(s.planned.map((p) => p.candidate.event_id)).size, moves: s.planned.slice(0, 50).map((p) => ({ source: p.source, dest: p.dest })), recovered: s.recovered });
  }
  if (what === 'apply' && parts.length === 2) {
    only('POST');
    const b = await readJson(req);
    const to = userPath('to', b.to);
    return json(tasks.start('apply', (report) => applyDecisions({ ledger, to, copy: b.copy === true, who: who(b.who), onFile: (d, t, f) => report(d, t, f) })), 202);
  }
  if (what === 'applies' && parts.length === 2) {
    only('GET');
    const db = openLedger(ledger);
    try {
      return json(createMoveStore(db).applies());
    } finally {
      db.close();
    }
  }
  if (what === 'undo' && parts.length === 2) {
    only('POST');
    const b = await readJson(req);
    const applyId = optional(b.apply, () => num(b.apply, 'apply', 1, 1e12, true));
    const events = optional(b.events, () => eventIds(b.events));
    return json(tasks.start('undo', (report) => undoApply({ ledger, applyId, events, onFile: (d, t, f) => report(d, t, f) })), 202);
  }
  if (what === 'moved' && parts.length === 2) {
    only('GET');
    const ids = eventIds((q.get('events') ?? '').split(',').filter(Boolean));
    const db = openLedger(ledger);
    try {
      const moved = createMoveStore(db).movedOfEvents(ids);
      return json({ events: [...new Set(moved.map((m) => m.event_id))], files: moved.length, applies: [...new Set(moved.map((m) => m.apply_id))] });
    } finally {
      db.close();
    }
  }
  if (what === 'audits' && id === 'plan' && parts.length === 3) {
    only('GET');
    const tolerance = optional(q.get('tolerance'), () => num(q.get('tolerance'), 'tolerance', 1e-6, 0.5)) ?? 0.01;
    const alpha = optional(q.get('alpha'), () => num(q.get('alpha'), 'alpha', 1e-6, 0.5)) ?? 0.05;
    const population = setAsideCount(ledger);
    return json({ tolerance, alpha, population, sample: zeroMissPlan(tolerance, alpha, population) });
  }
  if (what === 'audits' && parts.length === 2) {
    if (req.method.toUpperCase() === 'POST') {
      const b = await readJson(req);
      const r = drawAudit(ledger, {
        sample: num(b.sample, 'sample', 1, 1e7, true),
        strata: optional(b.strata, () => num(b.strata, 'strata', 1, 20, true)),
        tolerance: optional(b.tolerance, () => num(b.tolerance, 'tolerance', 1e-6, 0.5)),
        seed: optional(b.seed, () => num(b.seed, 'seed', 1, 2 ** 31, true)),
        who: who(b.who),
      });
      return json(loadAuditReport(ledger, r.id), 201);
    }
    only('GET');
    const db = openLedger(ledger);
    try {
      return json(createAuditStore(db).audits());
    } finally {
      db.close();
    }
  }
  if (what === 'audits' && id && parts.length <= 4) {
    const auditId = num(id, 'audit id', 1, 1e12, true);
    if (sub === 'answers' && parts.length === 4) {
      only('POST');
      const b = await readJson(req);
      if (typeof b.event !== 'string' || !EVENT_ID_RE.test(b.event)) throw badRequest('event: wanted an event id');
      if (typeof b.animal !== 'boolean') throw badRequest('animal: wanted true or false');
      answerAudit(ledger, auditId, [{ event: b.event, animal: b.animal }], who(b.who));
      return json(loadAuditReport(ledger, auditId));
    }
    if (parts.length === 3) {
      only('GET');
      return json(loadAuditReport(ledger, auditId));
    }
  }
  if (what === 'calibrate' && parts.length === 2) {
    only('POST');
    const b = await readJson(req);
    return json(calibrate(ledger, { recall: num(b.recall, 'recall', 0.5, 0.9999), apply: b.apply === true, who: who(b.who) }));
  }
  if (what === 'export' && parts.length === 2) {
    only('POST');
    const b = await readJson(req);
    const out = userPath('out', b.out);
    if (b.format !== 'csv' && b.format !== 'camtrap-dp') throw badRequest(`format: wanted csv or camtrap-dp, got ${JSON.stringify(b.format)}`);
    const offset = optional(b.utcOffset, () => {
      if (typeof b.utcOffset !== 'string' || !/^[+-](0\d|1[0-4]):[0-5]\d$/.test(b.utcOffset)) throw badRequest(`utcOffset: wanted +HH:MM or -HH:MM, got ${JSON.stringify(b.utcOffset)}`);
      return b.utcOffset;
    });
    const db = openLedger(ledger);
    // Replacing an earlier export is asked for in so many words; a ledger or a medium never is.
    const guard = { ledger, db, force: b.force === true };
    try {
      if (b.format === 'csv') {
        const rows = exportMedia(db);
        checkOutput(out, guard);
        mkdirSync(path.dirname(out), { recursive: true });
        writeOutput(out, mediaCsv(rows), guard);
        return json({ format: 'csv', out, rows: rows.length });
      }
      const table = optional(b.deployments, () => userPath('deployments', b.deployments));
      const facts = table ? new Map([...readDeploymentsTable(table).values()].map((f) => [f.deploymentID, f])) : undefined;
      const pkg = buildCamtrap(exportDeployments(db), exportMedia(db), exportEvents(db), {
        utcOffset: offset, facts, health: deploymentsHealth(healthRows(db)), projectTitle: typeof b.projectTitle === 'string' && b.projectTitle ? b.projectTitle.slice(0, 200) : path.basename(ledger, path.extname(ledger)),
        who: who(b.who) ?? 'unknown', created: new Date().toISOString().replace(/\.\d+Z$/, 'Z'), engineVersion: ENGINE_VERSION,
      });
      return json({ format: 'camtrap-dp', out, files: writePackage(out, pkg.descriptor, pkg.tables, guard) });
    } finally {
      db.close();
    }
  }
  if (what === 'cut' && parts.length === 2) {
    only('POST');
    const b = await readJson(req);
    const out = userPath('out', b.out);
    const db = openLedger(ledger);
    let rows;
    try {
      rows = clipWindows(db);
    } finally {
      db.close();
    }
    if (!rows.length) throw new HttpError(409, ApiErrorCode.notFound, 'no clip in this ledger has an activity window');
    const clips = rows.map((r) => ({ eventId: r.event_id, source: path.join(r.root, r.rel_path), display: r.rel_path, windows: JSON.parse(r.windows) as Array<{ start_s: number; end_s: number; score: number }> }));
    const total = clips.reduce((a, c) => a + c.windows.length, 0);
    return json(tasks.start('cut', async (report) => {
      let done = 0;
      const files = await cutWindows(clips, out, b.exact === true, (f) => report(++done, total, f.file));
      return { out, files: files.length };
    }), 202);
  }
  return undefined;
}
