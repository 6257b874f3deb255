/**
 * The entry file of a worker thread that lives beside the module at `base`.
 * Compiled (dist/), that is the worker's own `.js` module. Run from the
 * TypeScript sources, it is the `.mjs` shim beside it, which registers tsx
 * first: a worker does not inherit the main thread's module loader.
 */
export function workerEntry(base: string, name: string): URL {
  return new URL(base.endsWith('.ts') ? `./${name}.mjs` : `./${name}.js`, base);
}
