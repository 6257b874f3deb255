/** The real command line for tests: the bin run as a user runs it, and a folder's files by SHA-256 to show what changed. */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';

export const ROOT = path.join(import.meta.dirname, '../..');
export const BIN = path.join(ROOT, 'bin/plumbline.mjs');

export function cli(...args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' } });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

/** Every file below `dir` (relative path → SHA-256). */
export function hashTree(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const name of readdirSync(dir, { recursive: true }) as string[]) {
    const p = path.join(dir, name);
    if (statSync(p).isFile()) out[name] = createHash('sha256').update(readFileSync(p)).digest('hex');
  }
  return out;
}
