/**
 * The deployments table a user may give a scan: a CSV mapping folders (relative to a scanned
 * root) to deployment facts, with Camtrap DP 1.0.2 column names where the standard has them:
 * folder, deploymentID, locationName, latitude, longitude, cameraID, cameraModel.
 */
import path from 'node:path';
import { readFileSync } from 'node:fs';
import { PipelineErrorCode, pipelineError } from './pipeline-errors.js';

export interface DeploymentFacts {
  folder: string;
  deploymentID: string;
  locationName: string | null;
  latitude: number | null;
  longitude: number | null;
  cameraID: string | null;
  cameraModel: string | null;
}

/** RFC 4180 CSV: quoted fields, doubled quotes, CRLF or LF. */
export function parseCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cell = '';
  let quoted = false;
  const src = text.replace(/^\uFEFF/, '');
  for (let i = 0; i < src.length; i++) {
    const c = src[i];
    if (quoted) {
      if (c === '"' && src[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (c === '"') quoted = false;
      else cell += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      row.push(cell);
      cell = '';
    } else if (c === '\n' || c === '\r') {
      if (c === '\r' && src[i + 1] === '\n') i++;
      row.push(cell);
      rows.push(row);
      row = [];
      cell = '';
    } else cell += c;
  }
  if (cell || row.length) {
    row.push(cell);
    rows.push(row);
  }
  return rows.filter((r) => r.some((v) => v.trim() !== ''));
}

export function readDeploymentsTable(file: string): Map<string, DeploymentFacts> {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    throw pipelineError(PipelineErrorCode.badDeploymentsTable, `${file}: cannot read the deployments table (${(e as NodeJS.ErrnoException).code ?? e})`);
  }
  const [head, ...rows] = parseCsv(text);
  const col = (name: string): number => head?.findIndex((h) => h.trim() === name) ?? -1;
  const iFolder = col('folder');
  const iId = col('deploymentID');
  if (iFolder < 0 || iId < 0) throw pipelineError(PipelineErrorCode.badDeploymentsTable, `${file}: needs the columns folder and deploymentID (and optionally locationName, latitude, longitude, cameraID, cameraModel)`);
  const out = new Map<string, DeploymentFacts>();
  rows.forEach((r, n) => {
    const get = (name: string): string | null => {
      const i = col(name);
      const v = i >= 0 ? (r[i] ?? '').trim() : '';
      return v === '' ? null : v;
    };
    const num = (name: string, lo: number, hi: number): number | null => {
      const v = get(name);
      if (v === null) return null;
      const x = Number(v);
      if (!Number.isFinite(x) || x < lo || x > hi) throw pipelineError(PipelineErrorCode.badDeploymentsTable, `${file}, row ${n + 2}: ${name}: wanted number ${lo} to ${hi}, got ${JSON.stringify(v)}`);
      return x;
    };
    const folder = (get('folder') ?? '').replace(/\\/g, '/').replace(/^\.\/?|\/$/g, '');
    const id = get('deploymentID');
    if (!id) throw pipelineError(PipelineErrorCode.badDeploymentsTable, `${file}, row ${n + 2}: deploymentID is empty`);
    out.set(folder, { folder, deploymentID: id, locationName: get('locationName'), latitude: num('latitude', -90, 90), longitude: num('longitude', -180, 180), cameraID: get('cameraID'), cameraModel: get('cameraModel') });
  });
  return out;
}

/** The deployment a file belongs to, as the scan names it: the deployments table's id for its
 *  folder, else the folder's path below the root, else (files in the root itself) the root's
 *  name. scan.ts and shard-plan.ts both use it. */
export function deploymentIdOf(table: ReadonlyMap<string, DeploymentFacts>, root: string, folder: string): string {
  return table.get(folder)?.deploymentID ?? (folder || path.basename(root));
}
