// Finds the CLI's `main`: the compiled JavaScript in dist/ when it is at least
// as new as every source file (`npm ci` compiles it, through the `prepare`
// script), otherwise the TypeScript sources run through tsx, so an edited
// checkout never runs stale code. Loading the sources through tsx costs about
// 1.5 s a run; the compiled modules load in a fraction of that.
import { readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = fileURLToPath(new URL('..', import.meta.url));

/** Whether `root`/dist/cli.js exists and no file under `root`/src is newer. */
export function compiledIsFresh(root = ROOT) {
  let compiled;
  try {
    compiled = statSync(path.join(root, 'dist/cli.js')).mtimeMs;
  } catch {
    return false;
  }
  for (const entry of readdirSync(path.join(root, 'src'), { recursive: true, withFileTypes: true })) {
    if (entry.isFile() && statSync(path.join(entry.parentPath, entry.name)).mtimeMs > compiled) return false;
  }
  return true;
}

/** PLUMBLINE_FROM_SOURCE=1 runs the sources even when dist/ is fresh. */
export async function loadCli() {
  if (process.env.PLUMBLINE_FROM_SOURCE !== '1' && compiledIsFresh()) return (await import('../dist/cli.js')).main;
  const { register } = await import('tsx/esm/api');
  register();
  return (await import('../src/cli.ts')).main;
}
