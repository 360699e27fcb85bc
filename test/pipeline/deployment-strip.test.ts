/**
 * A scan finds a deployment's data strip by consensus of its triggers and every event ignores
 * it, where the strip's text (spread over the width, glyphs filling the bar) defeats the
 * per-frame test; a deployment with too few triggers is named in the scan's output. The cards
 * are the project's invented scenario (tools/scenes), written as a camera writes them.
 */
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { scan } from '../../src/pipeline/scan.js';
import type { ScanProgress } from '../../src/pipeline/progress.js';
import { renderScene } from '../../tools/scenes/render.js';
import { Category } from '../../tools/scenes/categories.js';
import { writeJpeg } from '../../tools/scenes/write-deployment.js';
import type { StripStyle } from '../../tools/scenes/data-strip.js';
import { tempDir } from '../helpers/cli.js';
import { mkdirSync } from 'node:fs';

const STRIP: StripStyle = { edge: 'both', share: 0.08, bar: 220, ink: 20, layout: 'spread', icon: true };

async function card(dir: string, triggers: number, world: number): Promise<void> {
  mkdirSync(dir, { recursive: true });
  let t = Date.parse('2025-08-02T04:00:00Z');
  for (let i = 0; i < triggers; i++) {
    t += 17 * 60_000;
    const s = renderScene({ seed: 5200 + i, world, category: i % 2 ? Category.wind : Category.empty, light: i % 3 ? 'day' : 'ir', frames: 1, width: 640, height: 480, strip: STRIP, neighbours: false });
    await writeJpeg(path.join(dir, `IMG_${String(i + 1).padStart(4, '0')}.JPG`), s.frames[0], t, 65, 'strip test (invented)');
  }
}

describe('the data strip of a deployment', () => {
  it('is found across triggers, ignored in every event, and a small deployment is named', async () => {
    const root = tempDir('movesift-strip-');
    await card(path.join(root, 'gully'), 8, 61);
    await card(path.join(root, 'ledge'), 3, 62);
    const ledger = path.join(root, 'scan.ledger');
    const seen: ScanProgress[] = [];
    await scan({ roots: [root], ledger, onProgress: (p) => seen.push(p) });
    const deployments = seen.filter((p): p is Extract<ScanProgress, { type: 'deployment' }> => p.type === 'deployment');
    const gully = deployments.find((d) => d.deployment === 'gully')!;
    const ledge = deployments.find((d) => d.deployment === 'ledge')!;
    // 8% of 480 rows is 38; at the 384 px analysis size, 23.
    expect(gully.frames).toBe(8);
    expect(gully.strip!.top).toBeGreaterThanOrEqual(23);
    expect(gully.strip!.bottom).toBeGreaterThanOrEqual(23);
    expect(gully.note).toBeUndefined();
    expect(ledge.strip).toBeUndefined();
    expect(ledge.note).toMatch(/ledge: 3 image trigger\(s\), too few/);

    const db = new Database(ledger, { readonly: true });
    const rows = db.prepare(`SELECT e.deployment_id AS dep, a.detail FROM analyses a JOIN events e ON e.id = a.event_id`).all() as Array<{ dep: string; detail: string }>;
    db.close();
    const gullyDetails = rows.filter((r) => r.dep === 'gully').map((r) => JSON.parse(r.detail));
    expect(gullyDetails).toHaveLength(8);
    for (const d of gullyDetails) {
      expect(d.strip.top).toBeGreaterThanOrEqual(gully.strip!.top);
      expect(d.strip.bottom).toBeGreaterThanOrEqual(gully.strip!.bottom);
    }
    // The per-frame test alone misses this strip on at least one edge of some trigger.
    expect(gullyDetails.some((d) => d.stripFrom === 'deployment')).toBe(true);
  }, 120_000);
});
