/**
 * The Electron shell, kept thin: one window that loads the renderer from the custom protocol
 * `movesift://app/`, whose every request goes to the same handler browser mode serves over
 * loopback HTTP. Context isolation and the sandbox are on, Node integration off; navigation and
 * new windows are refused; the renderer reaches the disk only through the handler and three
 * named pickers in the preload (Electron security checklist, electronjs.org/docs/latest/tutorial/security).
 */
import path from 'node:path';
import { app, BrowserWindow, dialog, ipcMain, protocol, session } from 'electron';
import { createHandler, type Handler } from '../../src/api/handler.js';
import { CSP } from '../../src/api/loopback-server.js';
import { ensureRenderer } from '../../src/cli/renderer-build.js';

const SCHEME = 'movesift';
const ORIGIN = `${SCHEME}://app`;
const LEDGER_FILTER = [{ name: 'Movesift ledger', extensions: ['ledger'] }];
const smoke = process.argv.includes('--smoke-test');
const ledgerArg = process.argv.slice(2).find((a) => a.endsWith('.ledger'));

protocol.registerSchemesAsPrivileged([{ scheme: SCHEME, privileges: { standard: true, secure: true, supportFetchAPI: true, stream: true } }]);

let handler: Handler | undefined;

function fromOurPage(e: { senderFrame: { url: string } | null }): boolean {
  return !!e.senderFrame && e.senderFrame.url.startsWith(`${ORIGIN}/`);
}

function registerPickers(win: BrowserWindow): void {
  ipcMain.handle('movesift:pick-folders', async (e) => {
    if (!fromOurPage(e)) return [];
    const r = await dialog.showOpenDialog(win, { title: 'Folders to scan', properties: ['openDirectory', 'multiSelections'] });
    return r.canceled ? [] : r.filePaths;
  });
  ipcMain.handle('movesift:pick-ledger', async (e) => {
    if (!fromOurPage(e)) return null;
    const r = await dialog.showOpenDialog(win, { title: 'Open a ledger', properties: ['openFile'], filters: LEDGER_FILTER });
    return r.canceled ? null : (r.filePaths[0] ?? null);
  });
  ipcMain.handle('movesift:new-ledger', async (e) => {
    if (!fromOurPage(e)) return null;
    const r = await dialog.showSaveDialog(win, { title: 'New ledger', defaultPath: path.join(app.getPath('documents'), 'survey.ledger'), filters: LEDGER_FILTER });
    return r.canceled || !r.filePath ? null : r.filePath;
  });
}

async function start(): Promise<void> {
  await app.whenReady();
  const rendererDir = ensureRenderer((s) => console.log(s));
  handler = createHandler({ ledger: ledgerArg, rendererDir });
  const h = handler;
  protocol.handle(SCHEME, async (request) => {
    const r = await h.handle(request);
    const headers = new Headers(r.headers);
    headers.set('content-security-policy', CSP);
    return new Response(r.body, { status: r.status, headers });
  });
  session.defaultSession.setPermissionRequestHandler((_wc, _permission, callback) => callback(false));
  app.on('web-contents-created', (_e, contents) => {
    contents.on('will-navigate', (ev, url) => url.startsWith(`${ORIGIN}/`) || ev.preventDefault());
    contents.on('will-redirect', (ev, url) => url.startsWith(`${ORIGIN}/`) || ev.preventDefault());
    contents.setWindowOpenHandler(() => ({ action: 'deny' }));
  });
  const win = new BrowserWindow({
    width: 1400,
    height: 900,
    minWidth: 800,
    minHeight: 560,
    show: false,
    title: 'Movesift',
    backgroundColor: '#13171c',
    webPreferences: { preload: path.join(import.meta.dirname, '../preload/preload.cjs'), contextIsolation: true, sandbox: true, nodeIntegration: false, webSecurity: true, spellcheck: false },
  });
  registerPickers(win);
  win.once('ready-to-show', () => win.show());
  if (smoke) {
    win.webContents.on('did-finish-load', async () => {
      // The smoke test: the renderer came up from the protocol and the preload's pickers are there.
      const ok = await win.webContents.executeJavaScript("new Promise(r => setTimeout(() => r(!!document.querySelector('#root > *') && typeof window.movesiftDesktop?.pickFolders === 'function'), 1500))");
      console.log(ok ? 'MOVESIFT_SMOKE_OK' : 'MOVESIFT_SMOKE_FAILED');
      app.exit(ok ? 0 : 1);
    });
  }
  await win.loadURL(`${ORIGIN}/`);
}

app.on('window-all-closed', () => {
  void (handler?.close() ?? Promise.resolve()).finally(() => app.quit());
});

start().catch((e: Error) => {
  dialog.showErrorBox('Movesift could not start', e.message);
  app.exit(1);
});
