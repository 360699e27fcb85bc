/** `movesift export <ledger> --format csv|camtrap-dp --out <path>`. */
import { existsSync, mkdirSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parse } from './args.js';
import { ExitCode, usageError } from './cli-errors.js';
import { openLedger } from '../ledger/open-ledger.js';
import { exportDeployments, exportEvents, exportMedia } from '../ledger/export-rows.js';
import { mediaCsv } from '../pipeline/export-csv.js';
import { buildCamtrap, writePackage } from '../pipeline/export-camtrap.js';
import { writeOutput } from '../pipeline/output-guard.js';
import { readDeploymentsTable, type DeploymentFacts } from '../pipeline/deployments-table.js';
import { ENGINE_VERSION } from '../pipeline/engine-version.js';
import { deploymentsHealth } from '../pipeline/report.js';
import { healthRows } from '../ledger/report-rows.js';

export const EXPORT_HELP = `Usage: movesift export <ledger> --format csv|camtrap-dp --out <path> [options]

  csv          one row per media file: event, times, deployment, score, verdict, decision, who, when
  camtrap-dp   a Camtrap DP ${'1.0.2'} package (a folder: datapackage.json, deployments.csv, media.csv,
               observations.csv) with event-level observations: set-aside events are blank, kept
               ones unclassified; undecided events carry the screener's proposal as a machine
               classification. Species are not named: that is for the people who review the kept events.

Options for camtrap-dp:
  --deployments <csv>     deployment facts (deploymentID, latitude, longitude, locationName, cameraID,
                          cameraModel) when the scan was not given them
  --utc-offset <+HH:MM>   offset for capture times the cameras recorded without one
  --project-title <t>     the project's title                                 default: the ledger's name
  --sampling-design <d>   Camtrap DP samplingDesign                           default: opportunistic
  --who <name>            the contributor                                     default: the user name

  --force                 replace files of an earlier export (never a ledger or a screened medium)

The export refuses, and lists what is missing, rather than write a package that is not valid.
It never replaces an existing file unless --force is given.`;

export async function exportCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ format?: string; out?: string; force?: boolean; deployments?: string; 'utc-offset'?: string; 'project-title'?: string; 'sampling-design'?: string; who?: string }>(argv, {
    format: { type: 'string' }, out: { type: 'string' }, force: { type: 'boolean' }, deployments: { type: 'string' }, 'utc-offset': { type: 'string' }, 'project-title': { type: 'string' }, 'sampling-design': { type: 'string' }, who: { type: 'string' },
  }, 'export');
  if (values.help) return console.log(EXPORT_HELP), ExitCode.done;
  if (positionals.length !== 1) throw usageError('export: give exactly one ledger. See `movesift export --help`.');
  if (values.format !== 'csv' && values.format !== 'camtrap-dp') throw usageError(`--format: wanted csv or camtrap-dp, got ${JSON.stringify(values.format ?? null)}`);
  if (!values.out) throw usageError('export: --out <path> is required.');
  const offset = values['utc-offset'];
  if (offset !== undefined && !/^[+-](0\d|1[0-4]):[0-5]\d$/.test(offset)) throw usageError(`--utc-offset: wanted +HH:MM or -HH:MM, got ${JSON.stringify(offset)}`);
  const design = values['sampling-design'] ?? 'opportunistic';
  if (!['simpleRandom', 'systematicRandom', 'clusteredRandom', 'experimental', 'targeted', 'opportunistic'].includes(design)) throw usageError(`--sampling-design: wanted one of Camtrap DP's values (simpleRandom, systematicRandom, clusteredRandom, experimental, targeted, opportunistic), got ${JSON.stringify(design)}`);
  const ledger = positionals[0];
  const db = openLedger(ledger);
  const guard = { ledger, db, force: !!values.force };
  try {
    if (values.format === 'csv') {
      const rows = exportMedia(db);
      writeOutput(values.out, mediaCsv(rows), guard);
      console.log(`Wrote ${rows.length} media row(s) to ${values.out}.`);
      return ExitCode.done;
    }
    let facts: Map<string, DeploymentFacts> | undefined;
    if (values.deployments) facts = new Map([...readDeploymentsTable(values.deployments).values()].map((f) => [f.deploymentID, f]));
    const pkg = buildCamtrap(exportDeployments(db), exportMedia(db), exportEvents(db), {
      utcOffset: offset, facts, health: deploymentsHealth(healthRows(db)), projectTitle: values['project-title'] ?? path.basename(ledger, path.extname(ledger)), who: values.who ?? os.userInfo().username,
      created: new Date().toISOString().replace(/\.\d+Z$/, 'Z'), engineVersion: ENGINE_VERSION,
    });
    (pkg.descriptor.project as { samplingDesign: string }).samplingDesign = design;
    writePackage(values.out, pkg.descriptor, pkg.tables, guard);
    console.log(`Wrote a Camtrap DP 1.0.2 package to ${values.out} (${Object.keys(pkg.tables).join(', ')}).`);
    return ExitCode.done;
  } finally {
    db.close();
  }
}
