/**
 * Judges scan reports of invented deployments against their ground truth, per scene family:
 * animal triggers kept (anything but likely-blank), false triggers called likely-blank, and how
 * well the event score ranks animals above false triggers inside each deployment (the area under
 * the ROC curve, as the Mann-Whitney U statistic over animal-blank pairs, ties counting half).
 */
import type { Report } from '../src/pipeline/report.js';
import type { FamilyFacts, FamilyName } from './scenes/families.js';
import type { TriggerTruth } from './scenes/write-deployment.js';

export interface FamilyResult {
  family: FamilyName;
  deployments: number;
  animals: number;
  animalsKept: number;
  /** Animals that passed during one of the place's false triggers (families.ts distractor). */
  weatherAnimals: number;
  weatherAnimalsKept: number;
  falseTriggers: number;
  falseBlank: number;
  falseUnsure: number;
  /** Of the false triggers called likely-blank, those the deployment's own calibration called
   *  so (the fitted model alone would not have). */
  falseBlankByDeployment: number;
  /** False triggers called likely-blank by the change classifier (classifier/combine.ts). */
  falseBlankByClassifier: number;
  /** Deployments and light modes by pass two's calibration status. */
  calibration: Record<string, number>;
  /** Mean over deployments with both kinds of the within-deployment AUC. */
  meanAuc: number;
  /** Animals called likely-blank: deployment, files, category, score. */
  lost: Array<{ deployment: string; first: string; category: string; distractor?: string; score: number; rule: string }>;
  /** Events of the report with no trigger in the truth (grouping differs from the shooting). */
  unmatched: number;
}

/** Area under the ROC curve of `pos` over `neg` (probability a positive outscores a negative). */
export function aucOf(pos: readonly number[], neg: readonly number[]): number {
  if (!pos.length || !neg.length) return NaN;
  let u = 0;
  for (const p of pos) for (const q of neg) u += p > q ? 1 : p === q ? 0.5 : 0;
  return u / (pos.length * neg.length);
}

export function judgeFamilies(reports: ReadonlyArray<{ family: FamilyName; report: Report }>, truth: readonly TriggerTruth[]): FamilyResult[] {
  const byFirst = new Map(truth.map((t) => [t.files[0], t]));
  return reports.map(({ family, report }) => {
    const r: FamilyResult = { family, deployments: 0, animals: 0, animalsKept: 0, weatherAnimals: 0, weatherAnimalsKept: 0, falseTriggers: 0, falseBlank: 0, falseUnsure: 0, falseBlankByDeployment: 0, falseBlankByClassifier: 0, calibration: {}, meanAuc: NaN, lost: [], unmatched: 0 };
    const perDeployment = new Map<string, { pos: number[]; neg: number[] }>();
    for (const e of report.events) {
      // A scan reports files relative to the folder it scanned (the family's folder), the truth
      // relative to the same folder.
      const t = byFirst.get(e.files[0]);
      if (!t) {
        r.unmatched++;
        continue;
      }
      const d = perDeployment.get(t.deployment) ?? { pos: [], neg: [] };
      perDeployment.set(t.deployment, d);
      if (t.animal) {
        r.animals++;
        d.pos.push(e.score);
        if (e.verdict !== 'likely-blank') r.animalsKept++;
        else r.lost.push({ deployment: t.deployment, first: e.files[0], category: t.category, distractor: t.distractor, score: e.score, rule: e.rule });
        if (t.distractor) {
          r.weatherAnimals++;
          if (e.verdict !== 'likely-blank') r.weatherAnimalsKept++;
        }
      } else {
        r.falseTriggers++;
        d.neg.push(e.score);
        if (e.verdict === 'likely-blank') r.falseBlank++;
        if (e.verdict === 'likely-blank' && e.rule === 'deployment') r.falseBlankByDeployment++;
        if (e.verdict === 'likely-blank' && e.rule === 'classifier') r.falseBlankByClassifier++;
        if (e.verdict === 'unsure') r.falseUnsure++;
      }
    }
    r.deployments = perDeployment.size;
    for (const c of report.calibrations ?? []) r.calibration[c.status] = (r.calibration[c.status] ?? 0) + 1;
    const aucs = [...perDeployment.values()].map((d) => aucOf(d.pos, d.neg)).filter((v) => Number.isFinite(v));
    r.meanAuc = aucs.length ? aucs.reduce((a, b) => a + b, 0) / aucs.length : NaN;
    return r;
  });
}

const pct = (a: number, b: number): string => (b ? `${a}/${b} = ${((100 * a) / b).toFixed(1)}%` : '-');

export function printFamilyTable(results: readonly FamilyResult[], facts: Record<FamilyName, FamilyFacts>): void {
  console.table(
    results.map((r) => ({
      family: r.family,
      'held out': facts[r.family].heldOut ? 'yes' : 'no (fitted)',
      'mostly false': facts[r.family].mostlyFalse ? 'yes' : 'no',
      deployments: r.deployments,
      'animals kept': pct(r.animalsKept, r.animals),
      'of them in weather': pct(r.weatherAnimalsKept, r.weatherAnimals),
      'false triggers likely-blank': pct(r.falseBlank, r.falseTriggers),
      'false triggers unsure': r.falseUnsure,
      'of the blank, by the deployment': r.falseBlankByDeployment,
      'by the classifier': r.falseBlankByClassifier,
      calibration: Object.entries(r.calibration).map(([k, n]) => `${n} ${k}`).join(', '),
      'AUC within deployment': r.meanAuc.toFixed(3),
    })),
  );
  for (const r of results) for (const l of r.lost) console.log(`lost: ${r.family} ${l.first} (${l.category}${l.distractor ? ` in ${l.distractor}` : ''}) score ${l.score.toFixed(4)}, by the ${l.rule}'s rule`);
  for (const r of results) if (r.unmatched) console.log(`${r.family}: ${r.unmatched} events not matched to a trigger (grouping split or merged triggers)`);
}
