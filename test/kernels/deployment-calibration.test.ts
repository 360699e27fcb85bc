/**
 * Per-deployment calibration without labels: its quantile against R's documented default
 * (type 7: quantile(1:10) gives 3.25 at 0.25 and 5.5 at 0.5, Hyndman & Fan 1996), the cut it
 * sets on a deployment whose false triggers score higher than the fitted family's (the premise
 * holds), and the fall-back on a busy place and on too few events (the premise cannot be known).
 */
import { describe, expect, it } from 'vitest';
import { CALIBRATION_CAP, CALIBRATION_Z, calibrateDeployment, deploymentVerdict, MIN_USABLE, quantileSorted } from '../../src/kernels/deployment-calibration.js';
import { MOVING_LIGHT_BLANK, Verdict } from '../../src/kernels/score.js';
import { makeRng } from '../../tools/scenes/random.js';

const FITTED = { blank: 0.32, motion: 0.34 };
const logit = (p: number) => Math.log(p / (1 - p));
const sigmoid = (z: number) => 1 / (1 + Math.exp(-z));

/** Scores whose logits are normal around `centre` with spread `sd` (a deployment's bulk). */
function bulk(n: number, centre: number, sd: number, seed: number): number[] {
  const rng = makeRng(seed);
  return Array.from({ length: n }, () => sigmoid(logit(centre) + sd * rng.normal()));
}

describe('deployment calibration', () => {
  it('takes quantiles as R does by default (type 7)', () => {
    const x = Array.from({ length: 10 }, (_, i) => i + 1);
    expect(quantileSorted(x, 0.25)).toBeCloseTo(3.25, 12);
    expect(quantileSorted(x, 0.5)).toBeCloseTo(5.5, 12);
    expect(quantileSorted(x, 0)).toBe(1);
    expect(quantileSorted(x, 1)).toBe(10);
  });

  it('raises the cut over a bulk of false triggers that score above the fitted threshold, and keeps the animals above it', () => {
    // 60 false triggers around 0.3 (logit spread 0.3: rain on this lens), 6 animals at 0.9+.
    const falses = bulk(60, 0.3, 0.3, 11);
    const animals = [0.9, 0.93, 0.95, 0.97, 0.99, 0.995];
    const c = calibrateDeployment([...falses, ...animals].map((score) => ({ score })), FITTED.blank);
    expect(c.status).toBe('applied');
    expect(c.usable).toBe(66);
    // Independent: the same statistics from a plain sort.
    const z = [...falses, ...animals].map(logit).sort((a, b) => a - b);
    const med = (z[32] + z[33]) / 2;
    expect(c.median).toBeCloseTo(med, 10);
    const q1 = z[16] + 0.25 * (z[17] - z[16]); // type 7 at (66 - 1) * 0.25 = 16.25
    expect(c.spread).toBeCloseTo((med - q1) / 0.6745, 10);
    expect(c.cut).toBeCloseTo(Math.min(CALIBRATION_CAP, sigmoid(med + CALIBRATION_Z * c.spread!)), 10);
    expect(c.cut).toBeGreaterThan(FITTED.blank);
    const verdicts = falses.map((s) => deploymentVerdict(FITTED, c.cut, s));
    const byDeployment = verdicts.filter((v) => v.rule === 'deployment');
    expect(byDeployment.length).toBeGreaterThan(10);
    expect(byDeployment.every((v) => v.verdict === Verdict.likelyBlank)).toBe(true);
    for (const a of animals) expect(deploymentVerdict(FITTED, c.cut, a).verdict).not.toBe(Verdict.likelyBlank);
  });

  it('never sets the cut above the cap, nor below the fitted threshold', () => {
    const high = calibrateDeployment(bulk(40, 0.45, 0.8, 12).map((score) => ({ score })), FITTED.blank);
    expect(high.status).toBe('applied');
    expect(high.cut).toBe(CALIBRATION_CAP);
    const quiet = calibrateDeployment(bulk(40, 0.02, 0.5, 13).map((score) => ({ score })), FITTED.blank);
    expect(quiet.status).toBe('applied');
    expect(quiet.cut).toBe(FITTED.blank);
    // A cut at the fitted threshold changes nothing: the model's rule decides every event.
    expect(bulk(40, 0.02, 0.5, 13).every((s) => deploymentVerdict(FITTED, quiet.cut, s).rule === 'model')).toBe(true);
  });

  it('steps back on a busy place, where most events score as animals do', () => {
    // A game trail: 30 animals, 12 false triggers around 0.45.
    const events = [...bulk(30, 0.95, 0.6, 14), ...bulk(12, 0.45, 0.3, 15)].map((score) => ({ score }));
    const c = calibrateDeployment(events, FITTED.blank);
    expect(c.status).toBe('busy');
    expect(c.cut).toBe(FITTED.blank);
    expect(c.median!).toBeGreaterThanOrEqual(logit(CALIBRATION_CAP));
    // Its false triggers at 0.45 stay with the fitted rule: not blank.
    expect(bulk(12, 0.45, 0.3, 15).filter((s) => deploymentVerdict(FITTED, c.cut, s).verdict === Verdict.likelyBlank && s >= FITTED.blank)).toEqual([]);
  });

  it('says too few below MIN_USABLE usable events; events without a background or without motion do not count', () => {
    const few = bulk(MIN_USABLE - 1, 0.3, 0.3, 16).map((score) => ({ score }));
    const withOthers = [...few, { score: 0 }, { score: 0 }, { score: 0.3, guard: { noBackground: true } }, { score: 0.3, guard: { noReference: true } }];
    const c = calibrateDeployment(withOthers, FITTED.blank);
    expect(c).toMatchObject({ status: 'too-few', events: MIN_USABLE + 3, usable: MIN_USABLE - 1, cut: FITTED.blank });
    expect(calibrateDeployment([...few, { score: 0.3 }], FITTED.blank).status).toBe('applied');
  });

  it('keeps the context guards: no background or moving light hold under the deployment rule too', () => {
    const cut = 0.45;
    expect(deploymentVerdict(FITTED, cut, 0.4)).toEqual({ verdict: Verdict.likelyBlank, rule: 'deployment' });
    // The model's own verdict stands where a guard holds: motion above its motion threshold,
    // unsure between its two thresholds.
    expect(deploymentVerdict(FITTED, cut, 0.4, { noBackground: true })).toEqual({ verdict: Verdict.motion, rule: 'model' });
    expect(deploymentVerdict(FITTED, cut, 0.4, { movingLight: true })).toEqual({ verdict: Verdict.motion, rule: 'model' });
    expect(deploymentVerdict(FITTED, cut, 0.33, { noBackground: true })).toEqual({ verdict: Verdict.unsure, rule: 'model' });
    expect(deploymentVerdict(FITTED, cut, 0.33, { movingLight: true })).toEqual({ verdict: Verdict.unsure, rule: 'model' });
    expect(deploymentVerdict(FITTED, cut, MOVING_LIGHT_BLANK / 2, { movingLight: true })).toEqual({ verdict: Verdict.likelyBlank, rule: 'model' });
    // Below the fitted threshold the model decides; at or above the cut, the deployment adds nothing.
    expect(deploymentVerdict(FITTED, cut, 0.1)).toEqual({ verdict: Verdict.likelyBlank, rule: 'model' });
    expect(deploymentVerdict(FITTED, cut, 0.45)).toEqual({ verdict: Verdict.motion, rule: 'model' });
  });
});
