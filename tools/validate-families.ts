/**
 * Whole deployments of every scene family (tools/scenes/families.ts), written as JPEG cards and
 * screened by the product's own scan, then judged against their ground truth: animal triggers
 * kept, false triggers called likely-blank, in the fitted family and in the held-out ones side by
 * side. The gap between them is the number to shrink: a number measured only on the family the
 * model was fitted on is not the product's number.
 *
 *   npm run validate:families                          6 deployments of 24 triggers per family
 *   npm run validate:families -- --deployments 3 --keep /tmp/cards   smaller, and keep the cards
 *   (a --keep folder that already holds cards and their ground truth is screened again as it is:
 *   the way to compare two versions of the engine on the same cards)
 *   npm run validate:families -- --first-seed 3100     other deployments: after a change was
 *   judged on the first seeds, the number to report comes from seeds it was not looked at on
 *   npm run validate:families -- --deployment-cut     with each deployment's own cut (scan --deployment-cut)
 *   npm run validate:families -- --classifier models/change-classifier.json
 *                                 motion alone and with the change classifier, the same cards, both tables
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { scanFamilies } from './scan-families.js';
import { drawDeployment, FAMILIES, FAMILY_FACTS, type FamilyName } from './scenes/families.js';
import { writeDeployment, type TriggerTruth } from './scenes/write-deployment.js';
import { inParts } from './parts.js';
import { judgeFamilies, printFamilyTable } from './family-judge.js';

const { values } = parseArgs({
  options: { deployments: { type: 'string' }, triggers: { type: 'string' }, families: { type: 'string' }, keep: { type: 'string' }, 'first-seed': { type: 'string' }, part: { type: 'string' }, 'deployment-cut': { type: 'boolean' }, classifier: { type: 'string' } },
  allowPositionals: true,
  strict: false,
});
const perFamily = Number(values.deployments ?? 6);
const triggers = Number(values.triggers ?? 24);
const families = (typeof values.families === 'string' ? values.families.split(',') : [...FAMILIES]) as FamilyName[];
/** Deployment seeds: their trigger seeds (seed * 1000 + i) lie far from the fit's (tools/scenes/seeds.ts). */
const FIRST_SEED = Number(values['first-seed'] ?? 3_000);
if (!Number.isInteger(FIRST_SEED) || FIRST_SEED < 3_000) throw new Error(`--first-seed must be an integer of at least 3000 (below it lie the fitting seeds), got ${values['first-seed']}`);
// The parts that write the cards run in child processes (parts.ts): they write into the
// parent's folder, which the parent hands them in the environment.
const root = typeof values.keep === 'string' ? path.resolve(values.keep) : (process.env.MOVESIFT_FAMILIES_ROOT ?? mkdtempSync(path.join(os.tmpdir(), 'movesift-families-')));
process.env.MOVESIFT_FAMILIES_ROOT = root;
const draws = families.flatMap((f) => Array.from({ length: perFamily }, (_, i) => drawDeployment(f, FIRST_SEED + i, triggers)));

const kept = path.join(root, 'ground-truth.json');
const truth = existsSync(kept) ? (JSON.parse(readFileSync(kept, 'utf8')) as TriggerTruth[]) : await inParts<TriggerTruth>(import.meta.filename, async (part, parts) => {
  const out: TriggerTruth[] = [];
  for (let k = part; k < draws.length; k += parts) {
    const d = draws[k];
    const dir = path.join(root, d.family);
    mkdirSync(dir, { recursive: true });
    out.push(...(await writeDeployment(d, dir)));
  }
  return out;
});

try {
  const deploymentCut = values['deployment-cut'] === true;
  const reports = await scanFamilies(root, families, { deploymentCut });
  if (typeof values.classifier === 'string') console.log('Motion alone:');
  printFamilyTable(judgeFamilies(reports, truth), FAMILY_FACTS);
  if (typeof values.classifier === 'string') {
    const withClassifier = await scanFamilies(root, families, { deploymentCut, classifier: path.resolve(values.classifier), suffix: '-classifier' });
    console.log(`With the change classifier (${values.classifier}):`);
    printFamilyTable(judgeFamilies(withClassifier, truth), FAMILY_FACTS);
  }
} finally {
  if (typeof values.keep !== 'string') rmSync(root, { recursive: true, force: true });
  else {
    writeFileSync(path.join(root, 'ground-truth.json'), JSON.stringify(truth, null, 1) + '\n');
    console.log(`cards, ledgers and ground-truth.json kept in ${root}`);
  }
}
