/**
 * Screens each family's folder under `root` into a fresh ledger of its own (`<family>.ledger`)
 * with the product's own scan, all cores, and returns each family's report: what the
 * validation tools judge against their ground truth.
 */
import { rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { buildReport, type Report } from '../src/pipeline/report.js';
import { scan } from '../src/pipeline/scan.js';

export async function scanFamilies<F extends string>(root: string, families: readonly F[], o: { deploymentCut?: boolean; classifier?: string; suffix?: string } = {}): Promise<Array<{ family: F; report: Report }>> {
  const reports: Array<{ family: F; report: Report }> = [];
  for (const f of families) {
    const ledger = path.join(root, `${f}${o.suffix ?? ''}.ledger`);
    rmSync(ledger, { force: true });
    const t0 = Date.now();
    await scan({ roots: [path.join(root, f)], ledger, workers: Math.max(1, os.availableParallelism()), deploymentCut: o.deploymentCut, classifier: o.classifier });
    console.error(`${f}${o.classifier ? ' with the classifier' : ''}: scanned in ${((Date.now() - t0) / 1000).toFixed(0)} s`);
    reports.push({ family: f, report: buildReport(ledger) });
  }
  return reports;
}
