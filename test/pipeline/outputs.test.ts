/**
 * What a scan leaves besides the report: the deployments table mapping, previews on disk for
 * every analysed event, the CSV report with spreadsheet-formula escaping (OWASP "CSV
 * injection": cells starting with = + - @ tab or CR are prefixed with a quote).
 */
import Database from 'better-sqlite3';
import { existsSync, mkdirSync, readFileSync, writeFileSync, copyFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';
import { csvCell } from '../../src/pipeline/report.js';
import { parseCsv } from '../../src/pipeline/deployments-table.js';

describe('scan outputs', () => {
  const d = tempDir('movesift-out-');
  const media = path.join(d, 'media');
  mkdirSync(path.join(media, 'north gate'), { recursive: true });
  for (const n of ['IMG_0001.JPG', 'IMG_0002.JPG', 'IMG_0003.JPG']) copyFileSync(path.join(ROOT, 'sample-media/ridge-trail', n), path.join(media, 'north gate', n));
  const table = path.join(d, 'deployments.csv');
  writeFileSync(table, 'folder,deploymentID,locationName,latitude,longitude,cameraID,cameraModel\r\n"north gate",NG-2025-06,"North gate, by the ""old"" oak",51.05,3.72,CAM-7,TC-1\r\n');
  const ledger = path.join(d, 'out.ledger');

  it('applies the deployments table and writes previews for every event', () => {
    const r = runCli(['scan', media, '--ledger', ledger, '--deployments', table]);
    expect(r.code, r.stderr).toBe(0);
    const db = new Database(ledger, { readonly: true });
    expect(db.prepare('SELECT id, folder, location_name, latitude, longitude, camera_id FROM deployments').all()).toEqual([
      { id: 'NG-2025-06', folder: 'north gate', location_name: 'North gate, by the "old" oak', latitude: 51.05, longitude: 3.72, camera_id: 'CAM-7' },
    ]);
    const previews = db.prepare('SELECT kind, path FROM previews').all() as Array<{ kind: string; path: string }>;
    db.close();
    expect(previews.filter((p) => p.kind === 'frame')).toHaveLength(3);
    expect(previews.filter((p) => p.kind === 'heat')).toHaveLength(1);
    for (const p of previews) expect(existsSync(path.join(`${ledger}.previews`, p.path))).toBe(true);
  });

  it('writes the CSV report to a file', () => {
    const out = path.join(d, 'report.csv');
    expect(runCli(['report', ledger, '--format', 'csv', '--out', out]).code).toBe(0);
    const rows = parseCsv(readFileSync(out, 'utf8'));
    expect(rows[0]).toEqual(['id', 'kind', 'deployment', 'start', 'end', 'verdict', 'score', 'decision', 'files', 'windows']);
    expect(rows).toHaveLength(2);
    expect(rows[1][2]).toBe('NG-2025-06');
    expect(rows[1][8]).toBe('north gate/IMG_0001.JPG;north gate/IMG_0002.JPG;north gate/IMG_0003.JPG');
  });

  it('adds flow features with --flow, as a separate analysis setting', () => {
    const r = runCli(['scan', media, '--ledger', ledger, '--deployments', table, '--flow']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('(1 screened now, 0 unchanged and skipped)'); // the parameter hash changed
    const db = new Database(ledger, { readonly: true });
    const f = JSON.parse((db.prepare('SELECT features FROM analyses').get() as { features: string }).features);
    db.close();
    expect(f.flow).toMatchObject({ meanMagnitude: expect.any(Number) });
  });

  it('rejects a deployments table without the needed columns, exit 2', () => {
    const bad = path.join(d, 'bad.csv');
    writeFileSync(bad, 'path,id\nx,y\n');
    const r = runCli(['scan', media, '--ledger', path.join(d, 'b.ledger'), '--deployments', bad]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/needs the columns folder and deploymentID/);
  });

  it('escapes cells a spreadsheet would run as formulas', () => {
    expect(csvCell('=HYPERLINK("x")')).toBe(`"'=HYPERLINK(""x"")"`);
    expect(csvCell('+1')).toBe("'+1");
    expect(csvCell('@SUM')).toBe("'@SUM");
    expect(csvCell('plain')).toBe('plain');
    expect(csvCell(null)).toBe('');
  });
});
