// Worker-thread entry: loads the TypeScript worker through tsx (the main thread's loader is not
// inherited by workers), so the pool runs the same sources as the in-process path.
import { register } from 'tsx/esm/api';

register();
await import('./analyse-worker-main.ts');
