/**
 * Camtrap DP 1.0.2 export (Bubnicki et al. 2023; camtrap-dp.tdwg.org): datapackage.json and the
 * deployments, media and observations tables. Observations are event-level and say what the
 * screening established, never a species: a set-aside event is `blank`, a kept one
 * `unclassified` (an animal or person may be there; naming it is not the screener's job), both
 * classified by a person (classifiedBy, classificationTimestamp from the decisions log). An
 * undecided event carries the machine's proposal: `blank` for likely-blank, else `unclassified`,
 * classified by the engine version, with classificationProbability its certainty in that class
 * (1 - motion evidence for blank; the motion evidence itself for unclassified).
 * Timestamps need an offset (%z): capture times without one take the offset given, or the export
 * refuses and says which deployments lack one. Deployments need coordinates and a time span: from
 * the deployments table (at scan time or here); the span defaults to the first and last capture.
 */
import path from 'node:path';
import type { ExportDeploymentRow, ExportEventRow, ExportMediaRow } from '../ledger/export-rows.js';
import { MovesiftError } from '../shared/errors.js';
import type { DeploymentFacts } from './deployments-table.js';
import type { DeploymentHealth } from '../shared/health.js';
import { existsSync, mkdirSync, statSync } from 'node:fs';
import { checkOutput, OutputErrorCode, writeOutput, type OutputContext } from './output-guard.js';
import { rawCsvCell } from './report.js';

export const CAMTRAP_VERSION = '1.0.2';
const BASE = `https://raw.githubusercontent.com/tdwg/camtrap-dp/${CAMTRAP_VERSION}`;
export const ExportErrorCode = { incomplete: 'E_EXPORT_INCOMPLETE' } as const;

export interface CamtrapOptions {
  /** Offset for capture times recorded without one, as +HH:MM or -HH:MM. */
  utcOffset?: string;
  /** Facts that fill in deployments (coordinates, names), by deploymentID. */
  facts?: Map<string, DeploymentFacts>;
  /** Camera problems found per deployment (deployment-health.ts), written as notes. */
  health?: readonly DeploymentHealth[];
  projectTitle: string;
  who: string;
  created: string;
  engineVersion: string;
}

export interface CamtrapPackage {
  descriptor: Record<string, unknown>;
  tables: { deployments: string; media: string; observations: string };
}

/** An ISO time as Camtrap DP wants it: seconds, and an offset (Z or ±HH:MM). */
function withOffset(iso: string, offset: string | undefined): string | null {
  const m = /^(\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d)(?:\.\d+)?(Z|[+-]\d\d:\d\d)?$/.exec(iso);
  if (!m) return null;
  if (m[2]) return m[1] + m[2];
  return offset ? m[1] + offset : null;
}

// Values are written as they are (RFC 4180 quoting only): a data package is read by programs, and
// a formula guard would corrupt negative coordinates and ids that start with a sign.
const table = (head: readonly string[], rows: Array<Record<string, unknown>>): string => [head.join(','), ...rows.map((r) => head.map((h) => rawCsvCell(r[h])).join(','))].join('\n') + '\n';

// Every column of the Camtrap DP 1.0.2 table schemas, in their order (a Frictionless header names
// every field of the schema, in order); the ones the screening does not know stay empty.
const DEPLOYMENT_FIELDS = ['deploymentID', 'locationID', 'locationName', 'latitude', 'longitude', 'coordinateUncertainty', 'deploymentStart', 'deploymentEnd', 'setupBy', 'cameraID', 'cameraModel', 'cameraDelay', 'cameraHeight', 'cameraDepth', 'cameraTilt', 'cameraHeading', 'detectionDistance', 'timestampIssues', 'baitUse', 'featureType', 'habitat', 'deploymentGroups', 'deploymentTags', 'deploymentComments'] as const;
const MEDIA_FIELDS = ['mediaID', 'deploymentID', 'captureMethod', 'timestamp', 'filePath', 'filePublic', 'fileName', 'fileMediatype', 'exifData', 'favorite', 'mediaComments'] as const;
const OBSERVATION_FIELDS = ['observationID', 'deploymentID', 'mediaID', 'eventID', 'eventStart', 'eventEnd', 'observationLevel', 'observationType', 'cameraSetupType', 'scientificName', 'count', 'lifeStage', 'sex', 'behavior', 'individualID', 'individualPositionRadius', 'individualPositionAngle', 'individualSpeed', 'bboxX', 'bboxY', 'bboxWidth', 'bboxHeight', 'classificationMethod', 'classifiedBy', 'classificationTimestamp', 'classificationProbability', 'observationTags', 'observationComments'] as const;
const mediatype = (r: ExportMediaRow): string => {
  const ext = path.extname(r.rel_path).slice(1).toLowerCase();
  const types: Record<string, string> = { jpg: 'image/jpeg', jpeg: 'image/jpeg', png: 'image/png', tif: 'image/tiff', tiff: 'image/tiff', mp4: 'video/mp4', m4v: 'video/mp4', mov: 'video/quicktime', avi: 'video/x-msvideo', mkv: 'video/x-matroska', mts: 'video/mp2t' };
  return types[ext] ?? (r.kind === 'video' ? 'video/octet-stream' : 'image/octet-stream');
};

export function buildCamtrap(deps: ExportDeploymentRow[], media: ExportMediaRow[], events: ExportEventRow[], o: CamtrapOptions): CamtrapPackage {
  // What is missing, grouped by deployment and cause: one line each, however many files.
  const noOffset = new Map<string, Set<string>>();
  const noPlace = new Set<string>();
  const ts = (iso: string, dep: string): string => {
    const v = withOffset(iso, o.utcOffset);
    if (!v) noOffset.set(dep, (noOffset.get(dep) ?? new Set<string>()).add(iso));
    return v ?? iso;
  };
  const labels = new Map<string, string>();
  for (const root of [...new Set(media.map((m) => m.root))].sort()) {
    let label = path.basename(root) || 'root';
    for (let k = 2; [...labels.values()].includes(label); k++) label = `${path.basename(root)}-${k}`;
    labels.set(root, label);
  }
  const health = new Map((o.health ?? []).map((h) => [h.id, h.health]));
  const depRows = deps.map((d) => {
    const f = o.facts?.get(d.id);
    const lat = d.latitude ?? f?.latitude ?? null;
    const lon = d.longitude ?? f?.longitude ?? null;
    if (lat === null || lon === null) noPlace.add(d.id);
    // A clock that was reset is what Camtrap DP's timestampIssues is for; every finding goes to
    // the deployment's comments. No finding leaves both empty (the screener cannot vouch for a clock).
    const found = health.get(d.id) ?? [];
    const clock = found.some((h) => h.code === 'clock-implausible' || h.code === 'clock-backwards');
    const notes = found.length ? `Camera problems found by Movesift: ${found.map((h) => h.message).join('; ')}` : null;
    return { deploymentID: d.id, locationName: d.location_name ?? f?.locationName ?? null, latitude: lat, longitude: lon, deploymentStart: ts(d.first_capture ?? '', d.id), deploymentEnd: ts(d.last_capture ?? '', d.id), cameraID: d.camera_id ?? f?.cameraID ?? null, cameraModel: d.camera_model ?? f?.cameraModel ?? null, timestampIssues: clock ? true : null, deploymentComments: notes };
  });
  // How each file was captured (Camtrap DP media.captureMethod): images are motion triggers; a
  // clip is one too when its deployment also holds images (a trail camera filming on its
  // trigger), and a scheduled recording when its deployment holds only clips (a survey station
  // started by a person or a timer). Our reading of the two terms; the project lists those used.
  const hasImages = new Set(media.filter((m) => m.kind === 'image').map((m) => m.deployment_id));
  const methodOf = (m: (typeof media)[number]) => (m.kind === 'image' || hasImages.has(m.deployment_id) ? 'activityDetection' : 'timeLapse');
  const mediaRows = media.map((m) => ({ mediaID: `m${m.media_id}`, deploymentID: m.deployment_id, captureMethod: methodOf(m), timestamp: ts(m.capture_time, m.deployment_id), filePath: `${labels.get(m.root)}/${m.rel_path}`, filePublic: false, fileName: path.basename(m.rel_path), fileMediatype: mediatype(m) }));
  const obsRows = events.map((e) => {
    const person = e.decision !== null;
    const type = person ? (e.decision === 'set-aside' ? 'blank' : 'unclassified') : e.verdict === 'likely-blank' ? 'blank' : 'unclassified';
    return {
      observationID: `o${e.id}`, deploymentID: e.deployment_id, eventID: e.id, eventStart: ts(e.start_time, e.deployment_id), eventEnd: ts(e.end_time, e.deployment_id),
      observationLevel: 'event', observationType: type, classificationMethod: person ? 'human' : 'machine', classifiedBy: person ? e.decided_by : `Movesift ${e.engine_version}`,
      classificationTimestamp: person ? withOffset(e.decided_at ?? '', undefined) : null, classificationProbability: person ? null : +(type === 'blank' ? 1 - e.score : e.score).toFixed(6),
    };
  });
  if (noOffset.size || noPlace.size) {
    const lines = [
      ...(noPlace.size ? [`no latitude and longitude for ${[...noPlace].join(', ')}: give a deployments table with them (columns folder, deploymentID, latitude, longitude)`] : []),
      ...[...noOffset].map(([dep, times]) => `${dep}: ${times.size} capture time(s) without a UTC offset (such as ${[...times].sort()[0]}): give the cameras' UTC offset, +HH:MM`),
    ];
    throw new MovesiftError(ExportErrorCode.incomplete, `a Camtrap DP package needs facts this ledger does not have:\n  ${lines.join('\n  ')}`);
  }
  const lats = depRows.map((r) => r.latitude as number), lons = depRows.map((r) => r.longitude as number);
  const dates = depRows.flatMap((r) => [r.deploymentStart, r.deploymentEnd]).map((t) => new Date(t).toISOString().slice(0, 10)).sort();
  const [w, e, s, n] = [Math.min(...lons), Math.max(...lons), Math.min(...lats), Math.max(...lats)];
  const descriptor = {
    name: 'movesift-screening',
    title: `${o.projectTitle}: screening result`,
    description: 'Event-level observations from motion screening by Movesift: set-aside events are blank, kept events unclassified (species are not the screener\'s job); undecided events carry the machine\'s proposal.',
    profile: `${BASE}/camtrap-dp-profile.json`,
    created: o.created,
    contributors: [{ title: o.who, role: 'contributor' }],
    sources: [{ title: 'Movesift', version: o.engineVersion }],
    project: { title: o.projectTitle, samplingDesign: 'opportunistic', captureMethod: [...new Set(mediaRows.map((r) => r.captureMethod))].sort(), individualAnimals: false, observationLevel: ['event'] },
    spatial: { type: 'Polygon', coordinates: [[[w, s], [e, s], [e, n], [w, n], [w, s]]] },
    temporal: { start: dates[0], end: dates[dates.length - 1] },
    taxonomic: [],
    resources: ['deployments', 'media', 'observations'].map((name) => ({ name, path: `${name}.csv`, profile: 'tabular-data-resource', format: 'csv', mediatype: 'text/csv', encoding: 'utf-8', schema: `${BASE}/${name}-table-schema.json` })),
  };
  return {
    descriptor,
    tables: {
      deployments: table(DEPLOYMENT_FIELDS, depRows),
      media: table(MEDIA_FIELDS, mediaRows),
      observations: table(OBSERVATION_FIELDS, obsRows),
    },
  };
}

/** Writes a package into `folder` (made if missing), each file checked and written whole
 *  (output-guard.ts); every target is checked before the first is written. */
export function writePackage(folder: string, descriptor: Record<string, unknown>, tables: CamtrapPackage['tables'], o: OutputContext): string[] {
  if (existsSync(folder) && !statSync(folder).isDirectory()) throw new MovesiftError(OutputErrorCode.exists, `${folder}: is a file; a Camtrap DP package is a folder`);
  const files: Array<[string, string]> = [['datapackage.json', JSON.stringify(descriptor, null, 2) + '\n'], ...Object.entries(tables).map(([name, text]) => [`${name}.csv`, text] as [string, string])];
  for (const [name] of files) checkOutput(path.join(folder, name), o);
  mkdirSync(folder, { recursive: true });
  for (const [name, text] of files) writeOutput(path.join(folder, name), text, o);
  return files.map(([name]) => name);
}
