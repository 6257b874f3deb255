// Peak resident memory for the benchmarks (plain JavaScript: bench/build-child.mjs runs without tsx).
import { readFileSync } from 'node:fs';

/**
 * This process's peak resident memory in MiB: Linux's VmHWM, which starts
 * afresh when the process is exec'd. getrusage's maxRSS does not: a child
 * spawned from a process holding 600 MiB reports at least 600 MiB (checked
 * here: 604 against a VmHWM of 40). Where there is no /proc, maxRSS.
 */
export function peakMiB() {
  try {
    const m = /^VmHWM:\s+(\d+) kB$/m.exec(readFileSync('/proc/self/status', 'utf8'));
    if (m) return Number(m[1]) / 1024;
  } catch {
    // No /proc: fall back.
  }
  return process.resourceUsage().maxRSS / 1024;
}
