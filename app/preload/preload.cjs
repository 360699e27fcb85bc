// @ts-check
// The preload: the only bridge from the sandboxed renderer to the main process. It exposes three
// named functions (the native pickers of desktop-api.ts), never ipcRenderer itself. Plain
// CommonJS, because a sandboxed preload cannot load ES modules or TypeScript.
const { contextBridge, ipcRenderer } = require('electron');

/** @type {import('./desktop-api').DesktopApi} */
const desktop = {
  pickFolders: () => ipcRenderer.invoke('movesift:pick-folders'),
  pickLedger: () => ipcRenderer.invoke('movesift:pick-ledger'),
  chooseNewLedger: () => ipcRenderer.invoke('movesift:new-ledger'),
};

contextBridge.exposeInMainWorld('movesiftDesktop', desktop);
