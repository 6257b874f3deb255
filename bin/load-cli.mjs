// Finds the CLI's `main`: the bundle in dist/bundle/ when it is at least as
// new as every source file, else the compiled JavaScript in dist/ when that
// is (`npm ci` compiles and bundles both, through the `prepare` script),
// otherwise the TypeScript sources run through tsx, so an edited checkout
// never runs stale code. Loading the sources through tsx costs about 1.5 s
// a run; the compiled modules load in a fraction of that, the bundle in
// less again (bin/bundle.mjs).
import { readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = fileURLToPath(new URL('..', import.meta.url));

/** Whether `root`/`file` exists and no file under `root`/src is newer. */
function isFresh(root, file) {
  let made;
  try {
    made = statSync(path.join(root, file)).mtimeMs;
  } catch {
    return false;
  }
  for (const entry of readdirSync(path.join(root, 'src'), { recursive: true, withFileTypes: true })) {
    if (entry.isFile() && statSync(path.join(entry.parentPath, entry.name)).mtimeMs > made) return false;
  }
  return true;
}

/** Whether `root`/dist/cli.js exists and no file under `root`/src is newer. */
export const compiledIsFresh = (root = ROOT) => isFresh(root, 'dist/cli.js');

/** Whether `root`/dist/bundle/cli.js exists and no file under `root`/src is newer. */
export const bundleIsFresh = (root = ROOT) => isFresh(root, 'dist/bundle/cli.js');

/**
 * PLUMBLINE_FROM_SOURCE=1 runs the sources even when dist/ is fresh;
 * PLUMBLINE_UNBUNDLED=1 runs dist/ rather than the bundle.
 */
export async function loadCli() {
  if (process.env.PLUMBLINE_FROM_SOURCE !== '1') {
    if (process.env.PLUMBLINE_UNBUNDLED !== '1' && bundleIsFresh()) return (await import('../dist/bundle/cli.js')).main;
    if (compiledIsFresh()) return (await import('../dist/cli.js')).main;
  }
  const { register } = await import('tsx/esm/api');
  register();
  return (await import('../src/cli.ts')).main;
}
