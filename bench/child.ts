/**
 * One `plumbline` command run in a child process for the benchmarks
 * (bench/build-child.mjs): its wall time and peak resident memory, worker
 * threads included, come back on its last stderr line.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';

export interface Measured {
  readonly wallMs: number;
  readonly maxRssMiB: number;
  readonly code: number;
}

export function measure(args: readonly string[]): Measured {
  const run = spawnSync(process.execPath, [path.resolve('bench/build-child.mjs'), ...args], { stdio: ['ignore', 'ignore', 'pipe'], maxBuffer: 1 << 26 });
  const last = run.stderr.toString().trim().split('\n').at(-1) ?? '';
  if (!last.startsWith('{')) throw new Error(`plumbline ${args.join(' ')} failed:\n${run.stderr.toString()}`);
  return JSON.parse(last) as Measured;
}
