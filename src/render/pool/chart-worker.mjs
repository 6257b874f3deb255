// Entry of a chart-rendering worker thread: the TypeScript sources run
// through tsx here as in the main thread (bin/plumbline.mjs), since a
// worker does not inherit the main thread's loader.
import { register } from 'tsx/esm/api';

register();
await import('./chart-worker.ts');
