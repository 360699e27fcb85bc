// `npm start [-- <ledger>]`: the desktop app when Electron's binary is installed; otherwise the
// same app in the browser (`movesift review`), with one line saying why.
import { spawn } from 'node:child_process';
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';

const root = path.resolve(import.meta.dirname, '..');
const args = process.argv.slice(2);

function electronBinary() {
  try {
    // The electron package's main export is the path of its downloaded binary; it throws when
    // the package or the binary is missing.
    const p = createRequire(import.meta.url)('electron');
    return typeof p === 'string' && existsSync(p) ? p : null;
  } catch {
    return null;
  }
}

const bin = electronBinary();
const child = bin
  ? spawn(bin, [path.join(root, 'app/main/main.mjs'), ...args], { stdio: 'inherit' })
  : (console.error('Electron is not installed here (its binary download failed or was skipped), so Movesift opens in your browser instead: same app, served on 127.0.0.1 only.'),
    spawn(process.execPath, [path.join(root, 'bin/movesift.mjs'), 'review', ...args], { stdio: 'inherit' }));
child.on('exit', (code) => process.exit(code ?? 0));
for (const s of ['SIGINT', 'SIGTERM']) process.on(s, () => child.kill(s));
