// Entry of the worker thread that writes index.md and index.html while the
// main thread lays out pack.pdf; tsx runs the TypeScript here as in the bin.
import { register } from 'tsx/esm/api';

register();
await import('./pages-worker.ts');
