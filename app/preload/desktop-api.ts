/**
 * The few functions the Electron preload puts on `window.movesiftDesktop`: native pickers that
 * return the paths the person chose. Absent in browser mode, where the start screen asks for
 * typed paths instead.
 */
export interface DesktopApi {
  /** Folders to scan; empty when the person cancelled. */
  pickFolders(): Promise<string[]>;
  /** An existing ledger to open, or null. */
  pickLedger(): Promise<string | null>;
  /** A new ledger file name to create, or null. */
  chooseNewLedger(): Promise<string | null>;
}

declare global {
  interface Window {
    movesiftDesktop?: DesktopApi;
  }
}
