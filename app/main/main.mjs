// Electron's entry: loads the TypeScript main process through tsx, the same way bin/movesift.mjs
// runs the command line, so the desktop app and browser mode run the very same backend sources.
import { register } from 'tsx/esm/api';

register();
await import('./electron-main.ts');
