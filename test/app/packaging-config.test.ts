/**
 * electron-builder.yml checked by electron-builder itself: its own configuration validator
 * (app-builder-lib `validateConfiguration`, against the JSON schema it ships, scheme.json), and
 * the files the configuration names exist in the tree.
 */
import { existsSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers/cli.js';

const require = createRequire(import.meta.url);
const yaml = require('js-yaml') as { load(s: string): unknown };
const { validateConfiguration } = require('app-builder-lib/out/util/config/config') as { validateConfiguration(c: unknown, log: { isEnabled: boolean; add(): void }): Promise<void> };
const config = yaml.load(readFileSync(path.join(ROOT, 'electron-builder.yml'), 'utf8')) as { files: string[]; extraMetadata: { main: string }; linux: unknown; win: unknown; mac: unknown };

describe('electron-builder.yml', () => {
  it('passes electron-builder\'s own configuration validator', async () => {
    await expect(validateConfiguration(config, { isEnabled: false, add() {} })).resolves.toBeUndefined();
  });
  it('is rejected by the same validator when an option is misspelt (the check can fail)', async () => {
    await expect(validateConfiguration({ ...config, linx: {} }, { isEnabled: false, add() {} })).rejects.toThrow(/linx/);
  });
  it('targets Linux, Windows and macOS, and every file it names exists', () => {
    expect(config.linux && config.win && config.mac).toBeTruthy();
    expect(existsSync(path.join(ROOT, config.extraMetadata.main))).toBe(true);
    for (const f of config.files.filter((f) => !f.startsWith('!'))) {
      const base = f.replace(/\/\*\*$/, '');
      if (base === 'dist/renderer') continue; // built by `vite build` before packaging
      expect(existsSync(path.join(ROOT, base)), f).toBe(true);
    }
    expect(existsSync(path.join(ROOT, 'app/preload/preload.cjs'))).toBe(true);
  });
});
