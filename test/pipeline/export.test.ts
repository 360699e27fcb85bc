/**
 * Exports. CSV: one row per media file, formula cells escaped (OWASP "CSV Injection"). Camtrap DP:
 * the package validates against the Camtrap DP 1.0.2 profile and table schemas in
 * ../shared/standards/camtrap-dp-1.0.2 (tdwg/camtrap-dp at tag 1.0.2): datapackage.json with ajv
 * (draft-04; the two schemas the profile pulls from the web, Frictionless data-package and
 * GeoJSON, are not available offline and are stood in for by permissive ones), each CSV with a
 * Table Schema check (test/helpers/table-schema.ts), and the foreign keys across tables.
 */
import { cpSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseCsv } from '../../src/pipeline/deployments-table.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';
import { checkTable, type TableSchema } from '../helpers/table-schema.js';

const STD = path.resolve(ROOT, '../shared/standards/camtrap-dp-1.0.2');
const schema = (name: string) => JSON.parse(readFileSync(path.join(STD, `${name}-table-schema.json`), 'utf8')) as TableSchema;

describe('exports', () => {
  const dir = tempDir('movesift-export-');
  const cards = path.join(dir, 'cards');
  const ledger = path.join(dir, 'x.ledger');
  const table = path.join(dir, 'deployments.csv');
  beforeAll(() => {
    cpSync(path.join(ROOT, 'sample-media/ridge-trail'), path.join(cards, 'ridge-trail'), { recursive: true });
    cpSync(path.join(ROOT, 'sample-media/reef-station'), path.join(cards, 'reef-station'), { recursive: true });
    // A folder whose name a spreadsheet would run as a formula: it becomes a deployment id and a path.
    cpSync(path.join(ROOT, 'sample-media/ridge-trail/IMG_0001.JPG'), path.join(cards, '=SUM(A1)', 'IMG_9001.JPG'));
    writeFileSync(table, 'folder,deploymentID,locationName,latitude,longitude,cameraID\nridge-trail,ridge-trail,Ridge trail,51.0521,3.7233,CAM-7\nreef-station,reef-station,Reef drop,-16.9203,145.7710,GoPro-2\n"=SUM(A1)",=SUM(A1),Odd name,50.5,4.25,CAM-9\n');
    expect(runCli(['scan', cards, '--ledger', ledger]).code).toBe(0);
    expect(runCli(['decide', ledger, '--set-aside', '--verdict', 'likely-blank', '--who', 'tech']).code).toBe(0);
    expect(runCli(['decide', ledger, '--keep', '--verdict', 'motion', '--deployment', 'reef-station', '--who', 'lead']).code).toBe(0);
  }, 120_000);

  it('CSV: one row per media file with the decision, and formula cells escaped', () => {
    const out = path.join(dir, 'media.csv');
    const r = runCli(['export', ledger, '--format', 'csv', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    const [head, ...rows] = parseCsv(readFileSync(out, 'utf8'));
    expect(head).toContain('decided_by');
    const report = JSON.parse(runCli(['report', ledger]).stdout) as { events: Array<{ files: string[] }> };
    expect(rows).toHaveLength(report.events.reduce((a, e) => a + e.files.length, 0));
    expect(rows.map((x) => x[head.indexOf('file')])).toContain("'=SUM(A1)/IMG_9001.JPG");
    expect(rows.map((x) => x[head.indexOf('deployment')])).toContain("'=SUM(A1)");
    expect(rows.some((x) => x.some((c) => c.startsWith('=')))).toBe(false);
    const who = rows.filter((x) => x[head.indexOf('decision')] === 'set-aside').map((x) => x[head.indexOf('decided_by')]);
    expect(who.length).toBeGreaterThan(0);
    expect(new Set(who)).toEqual(new Set(['tech']));
  });

  it('refuses a Camtrap DP package without coordinates or offsets, and says what is missing', () => {
    const r = runCli(['export', ledger, '--format', 'camtrap-dp', '--out', path.join(dir, 'incomplete')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('needs facts this ledger does not have');
    // One line per cause and deployment, however many files: the coordinates once, naming every
    // deployment without them; the offsets once per deployment, with how many times lack one.
    const lines = r.stderr.split('\n').filter((l) => l.startsWith('  '));
    expect(lines.filter((l) => /no latitude and longitude for/.test(l))).toHaveLength(1);
    expect(lines.find((l) => /no latitude and longitude for/.test(l))).toMatch(/=SUM\(A1\), reef-station, ridge-trail/);
    const ridge = lines.filter((l) => l.startsWith('  ridge-trail:'));
    expect(ridge).toHaveLength(1);
    expect(ridge[0]).toMatch(/^  ridge-trail: 32 capture time\(s\) without a UTC offset \(such as 2025-06-01T\d\d:\d\d:\d\d\): give the cameras' UTC offset, \+HH:MM$/);
    expect(lines).toHaveLength(3); // and =SUM(A1); the clip's times carry their own offset (Z)
  });

  it('Camtrap DP 1.0.2: the package and its tables validate against the standard', () => {
    const out = path.join(dir, 'package');
    const r = runCli(['export', ledger, '--format', 'camtrap-dp', '--out', out, '--deployments', table, '--utc-offset', '+02:00', '--project-title', 'Ridge and reef', '--who', 'lead']);
    expect(r.code, r.stderr).toBe(0);
    const require = createRequire(import.meta.url);
    const Ajv = require('ajv-draft-04');
    const ajv = new Ajv({ strict: false, allErrors: true, validateFormats: false });
    ajv.addSchema({}, 'https://specs.frictionlessdata.io/schemas/data-package.json');
    ajv.addSchema({}, 'http://json.schemastore.org/geojson.json');
    const validate = ajv.compile(JSON.parse(readFileSync(path.join(STD, 'camtrap-dp-profile.json'), 'utf8')));
    const descriptor = JSON.parse(readFileSync(path.join(out, 'datapackage.json'), 'utf8'));
    expect(validate(descriptor), JSON.stringify(validate.errors)).toBe(true);
    const tables = Object.fromEntries(['deployments', 'media', 'observations'].map((n) => [n, checkTable(readFileSync(path.join(out, `${n}.csv`), 'utf8'), schema(n))]));
    for (const [n, t] of Object.entries(tables)) expect(t.errors, n).toEqual([]);
    const deps = new Set(tables.deployments.rows.map((x) => x.deploymentID));
    const media = new Set(tables.media.rows.map((x) => x.mediaID));
    for (const m of tables.media.rows) expect(deps.has(m.deploymentID)).toBe(true);
    for (const o of tables.observations.rows) {
      expect(deps.has(o.deploymentID)).toBe(true);
      if (o.mediaID !== null) expect(media.has(o.mediaID)).toBe(true);
    }
    const report = JSON.parse(runCli(['report', ledger]).stdout) as { events: Array<{ id: string; decision: string | null; verdict: string; score: number }> };
    const byEvent = new Map(tables.observations.rows.map((o) => [o.eventID, o]));
    expect(byEvent.size).toBe(report.events.length);
    for (const e of report.events) {
      const o = byEvent.get(e.id)!;
      if (e.decision === 'set-aside') expect(o).toMatchObject({ observationType: 'blank', classificationMethod: 'human', classifiedBy: 'tech' });
      else if (e.decision === 'keep') expect(o).toMatchObject({ observationType: 'unclassified', classificationMethod: 'human', classifiedBy: 'lead' });
      else {
        expect(o.classificationMethod).toBe('machine');
        expect(o.observationType).toBe(e.verdict === 'likely-blank' ? 'blank' : 'unclassified');
        expect(o.classificationProbability).toBeCloseTo(e.verdict === "likely-blank" ? 1 - e.score : e.score, 3); // the report rounds scores to 4 places
      }
    }
    expect(tables.deployments.rows.find((d) => d.deploymentID === 'ridge-trail')).toMatchObject({ latitude: 51.0521, longitude: 3.7233, locationName: 'Ridge trail' });
    expect(tables.deployments.rows.find((d) => d.deploymentID === 'reef-station')).toMatchObject({ latitude: -16.9203, longitude: 145.771 }); // values untouched by the spreadsheet guard
    expect(tables.deployments.rows.some((d) => d.deploymentID === '=SUM(A1)')).toBe(true);
    // The clip: its event and its deployment last its 24 s, and its capture method is named (a
    // station holding only clips records on a schedule; the trail camera's images are triggers).
    const clipObs = tables.observations.rows.find((o) => o.deploymentID === 'reef-station')!;
    expect(Date.parse(String(clipObs.eventEnd)) - Date.parse(String(clipObs.eventStart))).toBe(24_000);
    const reef = tables.deployments.rows.find((d) => d.deploymentID === 'reef-station')!;
    expect(Date.parse(String(reef.deploymentEnd)) - Date.parse(String(reef.deploymentStart))).toBe(24_000);
    expect(new Set(tables.media.rows.filter((m) => m.deploymentID === 'reef-station').map((m) => m.captureMethod))).toEqual(new Set(['timeLapse']));
    expect(new Set(tables.media.rows.filter((m) => m.deploymentID === 'ridge-trail').map((m) => m.captureMethod))).toEqual(new Set(['activityDetection']));
    expect(descriptor.project.captureMethod).toEqual(['activityDetection', 'timeLapse']);
  });
});

