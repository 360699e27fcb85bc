/**
 * The part of Electron's API this main process uses, declared here because the `electron`
 * package (an optional dependency) cannot install where its binary download is blocked, and the
 * type check must still run there. Where the package is installed, its own electron.d.ts is
 * found first and this file is not used. Shapes follow Electron's documentation (electronjs.org/docs/latest/api).
 */
declare module 'electron' {
  interface WebContents {
    on(event: 'will-navigate' | 'will-redirect', listener: (e: { preventDefault(): void }, url: string) => void): this;
    on(event: 'did-finish-load', listener: () => void): this;
    setWindowOpenHandler(handler: (details: { url: string }) => { action: 'deny' | 'allow' }): void;
    executeJavaScript(code: string): Promise<unknown>;
  }
  class BrowserWindow {
    constructor(options: {
      width?: number;
      height?: number;
      minWidth?: number;
      minHeight?: number;
      show?: boolean;
      title?: string;
      backgroundColor?: string;
      webPreferences: { preload: string; contextIsolation: boolean; sandbox: boolean; nodeIntegration: boolean; webSecurity: boolean; spellcheck?: boolean };
    });
    webContents: WebContents;
    loadURL(url: string): Promise<void>;
    once(event: 'ready-to-show', listener: () => void): this;
    show(): void;
    static getFocusedWindow(): BrowserWindow | null;
  }
  interface OpenDialogReturnValue {
    canceled: boolean;
    filePaths: string[];
  }
  interface SaveDialogReturnValue {
    canceled: boolean;
    filePath?: string;
  }
  interface FileFilter {
    name: string;
    extensions: string[];
  }
  const dialog: {
    showOpenDialog(window: BrowserWindow, options: { title?: string; properties: Array<'openFile' | 'openDirectory' | 'multiSelections'>; filters?: FileFilter[] }): Promise<OpenDialogReturnValue>;
    showSaveDialog(window: BrowserWindow, options: { title?: string; defaultPath?: string; filters?: FileFilter[] }): Promise<SaveDialogReturnValue>;
    showErrorBox(title: string, content: string): void;
  };
  const protocol: {
    registerSchemesAsPrivileged(schemes: Array<{ scheme: string; privileges: { standard?: boolean; secure?: boolean; supportFetchAPI?: boolean; stream?: boolean; corsEnabled?: boolean } }>): void;
    handle(scheme: string, handler: (request: Request) => Response | Promise<Response>): void;
  };
  const ipcMain: {
    handle(channel: string, listener: (event: { senderFrame: { url: string } | null }, ...args: unknown[]) => unknown): void;
  };
  const session: {
    defaultSession: {
      setPermissionRequestHandler(handler: (wc: unknown, permission: string, callback: (granted: boolean) => void) => void): void;
    };
  };
  const app: {
    whenReady(): Promise<void>;
    on(event: 'window-all-closed' | 'will-quit', listener: (e: { preventDefault(): void }) => void): void;
    on(event: 'web-contents-created', listener: (e: unknown, contents: WebContents) => void): void;
    quit(): void;
    exit(code?: number): void;
    getPath(name: 'documents' | 'home'): string;
    commandLine: { appendSwitch(name: string, value?: string): void };
  };
}
