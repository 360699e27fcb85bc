/**
 * Deployment health through the real command line, on a card with a fogged lens for two
 * triggers and a clock reset on the last (test/helpers/faulty-card.ts): `scan` names both at its
 * end and `report` lists them under the deployment; the untouched camera stays without findings.
 */
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli, tempDir } from '../helpers/cli.js';
import { writeBumpedCard, writeFaultyCard } from '../helpers/faulty-card.js';
import type { Report } from '../../src/pipeline/report.js';

describe('deployment health of a scanned card', () => {
  let report: Report;
  let stdout: string;
  let ledger: string;
  let dir: string;
  beforeAll(async () => {
    dir = tempDir();
    await writeFaultyCard(dir);
    expect(readdirSync(path.join(dir, 'ridge-trail'))).toHaveLength(32);
    ledger = path.join(tempDir(), 'health.ledger');
    const scan = runCli(['scan', dir, '--ledger', ledger]);
    expect(scan.code, scan.stderr).toBe(0);
    stdout = scan.stdout;
    report = JSON.parse(runCli(['report', ledger, '--format', 'json']).stdout) as Report;
  }, 120_000);

  it('report lists the fogged lens and the clock reset under the card, nothing under the other camera', () => {
    const ridge = report.deployments.find((d) => d.id === 'ridge-trail')!;
    const creek = report.deployments.find((d) => d.id === 'creek-bend')!;
    console.log(JSON.stringify(ridge.health, null, 1));
    expect(creek.health).toEqual([]);
    expect(ridge.health.map((f) => f.code).sort()).toEqual(['clock-backwards', 'clock-implausible', 'lens-obscured']);
    const fog = ridge.health.find((f) => f.code === 'lens-obscured')!;
    expect(fog.events).toBe(2);
    const byId = new Map(report.events.map((e) => [e.id, e]));
    expect(byId.get(fog.from)!.files[0]).toBe('ridge-trail/IMG_0007.JPG');
    expect(byId.get(fog.to)!.files[0]).toBe('ridge-trail/IMG_0010.JPG');
    expect(ridge.health.find((f) => f.code === 'clock-backwards')!.message).toMatch(/went back 25\.4 years between ridge-trail\/IMG_0027\.JPG .* ridge-trail\/IMG_0030\.JPG/);
  });

  it('scan names them at its end', () => {
    expect(stdout).toMatch(/Camera problems/);
    expect(stdout).toMatch(/ridge-trail: 2 day triggers .* far less detail/);
    expect(stdout).toMatch(/ridge-trail: 1 trigger\(s\) carry a capture time before 2001/);
  });

  it('a Camtrap DP export notes them under the deployment: timestampIssues for the clock, the findings as comments', () => {
    const out = path.join(tempDir(), 'package');
    const table = path.join(tempDir(), 'deployments.csv');
    writeFileSync(table, 'folder,deploymentID,latitude,longitude\nridge-trail,ridge-trail,51.05,3.72\ncreek-bend,creek-bend,51.06,3.71\n');
    const r = runCli(['export', ledger, '--format', 'camtrap-dp', '--out', out, '--deployments', table, '--utc-offset', '+02:00']);
    expect(r.code, r.stderr).toBe(0);
    const [head, ...rows] = readFileSync(path.join(out, 'deployments.csv'), 'utf8').trim().split('\n');
    const cols = head.split(',');
    const cell = (id: string, name: string) => {
      const row = rows.find((x) => x.startsWith(`${id},`))!;
      // deploymentComments is the last column and may be quoted (it holds commas).
      return name === 'deploymentComments' ? row.slice(row.indexOf(',"') + 1) : row.split(',')[cols.indexOf(name)];
    };
    expect(cell('ridge-trail', 'timestampIssues')).toBe('true');
    expect(cell('ridge-trail', 'deploymentComments')).toMatch(/^"Camera problems found by Movesift: .*fogged, wet or covered/);
    expect(cell('creek-bend', 'timestampIssues')).toBe('');
    expect(rows.find((x) => x.startsWith('creek-bend,'))!.endsWith(',')).toBe(true); // no comments
  });
});

describe('a camera knocked part way through a deployment', () => {
  it('report names the change of view at the first trigger after it, and nothing in the other camera', async () => {
    const dir = tempDir();
    await writeBumpedCard(dir);
    const ledger = path.join(tempDir(), 'bumped.ledger');
    expect(runCli(['scan', dir, '--ledger', ledger]).code).toBe(0);
    const report = JSON.parse(runCli(['report', ledger, '--format', 'json']).stdout) as Report;
    const ridge = report.deployments.find((d) => d.id === 'ridge-trail')!;
    console.log(JSON.stringify(ridge.health, null, 1));
    expect(report.deployments.find((d) => d.id === 'creek-bend')!.health).toEqual([]);
    expect(ridge.health.map((f) => f.code)).toEqual(['view-changed']);
    const first = report.events.find((e) => e.id === ridge.health[0].from)!;
    expect(first.files[0]).toBe('ridge-trail/IMG_0020.JPG');
    expect(ridge.health[0].message).toMatch(/the view changed between ridge-trail\/IMG_0017\.JPG .* and ridge-trail\/IMG_0020\.JPG/);
  }, 120_000);
});

