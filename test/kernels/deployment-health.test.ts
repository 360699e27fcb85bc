/**
 * Deployment health (src/kernels/deployment-health.ts) and the scene signature it reads
 * (scene-signature.ts). The signature is checked on the real infrared burst of ../shared/fixtures
 * (Camtrap DP 1.0.2 example data, MICA project, CC-BY 4.0): the frames of one burst have about the
 * same detail, a fogged lens (a wide blur) loses most of it, and a lamp that fails darkens the
 * picture. The rules are checked on constructed deployments, one fault each, and on a healthy one.
 */
import { describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { deploymentHealth, type HealthInput } from '../../src/kernels/deployment-health.js';
import { sceneSignature, type SceneSignature } from '../../src/kernels/scene-signature.js';
import { makeRgb, type RgbFrame } from '../../src/kernels/frame.js';
import { detectDataStripInFrames, ignoreMask } from '../../src/kernels/data-strip.js';
import { IR_BURST, readRgb } from '../helpers/fixtures.js';

async function blurred(f: RgbFrame, sigma: number): Promise<RgbFrame> {
  const { data } = await sharp(f.data, { raw: { width: f.width, height: f.height, channels: 3 } }).blur(sigma).raw().toBuffer({ resolveWithObject: true });
  return { ...f, data: new Uint8Array(data) };
}

describe('scene signature', () => {
  it('on the real infrared burst: the frames of one burst alike, a fogged lens loses the detail, a failed lamp the light', async () => {
    const frames = await Promise.all(IR_BURST.slice(0, 4).map((f) => readRgb(f, 384)));
    // As the scan signs a trigger: its data strip left out (it changes every frame).
    const strip = detectDataStripInFrames(frames);
    const mask = ignoreMask(frames[0].width, frames[0].height, strip);
    const s = frames.map((f) => sceneSignature(f, mask));
    for (const x of s) {
      expect(x.texture / s[0].texture).toBeGreaterThan(0.8);
      expect(x.texture / s[0].texture).toBeLessThan(1.25);
    }
    const fog = sceneSignature(await blurred(frames[0], 6), mask);
    expect(fog.texture).toBeLessThan(0.35 * s[0].texture);
    expect(Math.abs(fog.luma - s[0].luma)).toBeLessThan(2); // a blur keeps the light
    const dark = sceneSignature({ ...frames[0], data: frames[0].data.map((v) => Math.round(v * 0.1)) }, mask);
    expect(dark.luma).toBeLessThan(0.3 * s[0].luma);
  });

  it('a flat frame has no texture; masked rows are left out', () => {
    const f = makeRgb(40, 30);
    f.data.fill(90);
    expect(sceneSignature(f)).toEqual({ luma: 90, texture: 0 });
    for (let i = 0; i < 40 * 3 * 3; i++) f.data[i] = i % 2 ? 255 : 0; // a busy strip on the top rows
    const mask = { width: 40, height: 30, channels: 1 as const, data: new Uint8Array(1200).fill(255) };
    mask.data.fill(0, 0, 120);
    expect(sceneSignature(f, mask).texture).toBe(0);
  });
});

describe('deployment health', () => {
  // A healthy camera: 24 day triggers an hour apart, their detail varying a little.
  const scene = (k: number): SceneSignature => ({ luma: 110 + 5 * Math.sin(k), texture: 9 + Math.sin(k * 7) });
  const start = Date.UTC(2025, 6, 1, 6);
  const day = (n: number): HealthInput[] =>
    Array.from({ length: n }, (_, k) => ({ id: `e${k}`, time: new Date(start + k * 3_600_000).toISOString(), sortMs: start + k * 3_600_000, file: `DCIM/IMG_${String(k + 1).padStart(4, '0')}.JPG`, light: 'day' as const, scene: scene(k) }));
  const codes = (f: ReturnType<typeof deploymentHealth>) => f.map((x) => `${x.code} ${x.from}-${x.to}`);

  it('finds nothing wrong with a healthy deployment', () => {
    expect(deploymentHealth(day(24))).toEqual([]);
  });

  it('a fogged lens for three triggers, then clear', () => {
    const d = day(24).map((e, k) => (k >= 6 && k < 9 ? { ...e, scene: { ...e.scene!, texture: 2 } } : e));
    expect(codes(deploymentHealth(d))).toEqual(['lens-obscured e6-e8']);
  });

  it('one dull trigger is not a finding (rain, a moth on the lens)', () => {
    const d = day(24).map((e, k) => (k === 6 ? { ...e, scene: { ...e.scene!, texture: 2 } } : e));
    expect(deploymentHealth(d)).toEqual([]);
  });

  it('the infrared lamp failing at night', () => {
    const d: HealthInput[] = day(24).map((e, k) => ({ ...e, light: 'ir' as const, scene: { ...e.scene!, luma: k >= 20 ? 4 : 60 } }));
    expect(codes(deploymentHealth(d))).toEqual(['night-dark e20-e23']);
  });

  it('a clock reset: times before 2000 and going back in file order', () => {
    const d = day(24).map((e, k) => (k >= 22 ? { ...e, time: `2000-01-01T00:0${k - 22}:00`, sortMs: Date.UTC(2000, 0, 1, 0, k - 22) - 1 } : e));
    const f = deploymentHealth(d);
    expect(codes(f)).toEqual(['clock-implausible e22-e23', 'clock-backwards e21-e22']);
    expect(f[1].message).toMatch(/went back 25\.5 years between DCIM\/IMG_0022.JPG/);
  });

  // Neighbour records as the deployment backgrounds leave them: each trigger compared with the
  // middle files of the two before and the two after it.
  const withNeighbours = (d: HealthInput[], fits: (i: number, j: number) => { kept: boolean; dx: number }): HealthInput[] =>
    d.map((e, i) => ({
      ...e,
      midFile: e.file,
      neighbours: [i - 1, i + 1, i - 2, i + 2].filter((j) => j >= 0 && j < d.length).map((j) => {
        const f = fits(i, j);
        return { file: d[j].file, kept: f.kept, disagreement: f.kept ? 1 + 0.1 * Math.sin(i + j) : 6, compensated: f.dx !== 0, shift: { dx: f.dx, dy: 0 } };
      }),
    }));

  it('a camera knocked between two triggers: neighbours across disagree, those on each side agree', () => {
    const moved = (i: number, j: number) => (i < 14) !== (j < 14);
    const dropped = withNeighbours(day(24), (i, j) => ({ kept: !moved(i, j), dx: 0 }));
    expect(codes(deploymentHealth(dropped))).toEqual(['view-changed e14-e23']);
    const f = deploymentHealth(dropped);
    expect(codes(f)).toEqual(['view-changed e14-e23']);
    expect(f[0].message).toMatch(/between DCIM\/IMG_0014.JPG .* and DCIM\/IMG_0015.JPG/);
    // Two odd triggers in a row (a passing cloud over both) are no change of view either.
    const pair = withNeighbours(day(24), (i, j) => ({ kept: !([9, 10].includes(i) || [9, 10].includes(j)), dx: 0 }));
    expect(deploymentHealth(pair)).toEqual([]);
  });

  it('one odd trigger (a cloud shadow that no neighbour fits) is no change of view', () => {
    const d = withNeighbours(day(24), (i, j) => ({ kept: i !== 9 && j !== 9, dx: 0 }));
    expect(deploymentHealth(d)).toEqual([]);
  });

  it('judges a trigger without a signature (an older ledger) by its time only', () => {
    const d = day(8).map((e) => ({ ...e, scene: undefined }));
    expect(deploymentHealth(d)).toEqual([]);
  });
});
