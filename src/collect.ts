/**
 * How the build keeps its heap near what is live. Each stage (analysis,
 * scenes, charts, the pack tree, the PDF) leaves most of what it allocated
 * behind as garbage, and V8 lets the heap grow to a multiple of what is
 * live before it collects on its own: a single series of a million points
 * grew from 273 MB live to 976 MB during its analysis without one full
 * collection, and peaked at 1.5 GB. Two measures, both measured on that
 * series and on the 1,000-characteristic plant (README, Performance):
 *
 * - the heap may grow by half of what is live before V8 collects
 *   (V8's `--heap-growing-percent`; set at run time it takes effect, as the
 *   peaks measured with and without it show), instead of V8's own factor,
 *   which let the heap reach 3.5 times what was live;
 * - at each stage's end, a full collection when the heap has grown by a
 *   quarter since the last one.
 *
 * Node exposes the collector only behind `--expose-gc`. Both flags are set
 * at run time, the collector taken from a fresh context, as Jest's leak
 * detector does it (recalled from its source, not from documentation).
 * Where a flag cannot take effect nothing changes and the build runs as
 * before, only with more memory.
 */
import { getHeapStatistics, setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

/** How far the heap may grow past what is live before V8 collects, in percent. */
export const HEAP_GROWTH_PERCENT = 50;
/** Below this many bytes of heap a collection would cost more than it frees. */
export const COLLECT_ABOVE = 256 * 1024 * 1024;

/** Sets V8's heap growing factor for the rest of the process (a command-line build; tests do not call it). */
export function moderateHeapGrowth(percent = HEAP_GROWTH_PERCENT): void {
  try {
    setFlagsFromString(`--heap-growing-percent=${percent}`);
  } catch {
    // Not this engine's flag: the build uses more memory, nothing else changes.
  }
}

let collector: (() => void) | null | undefined;
let liveAfterLast = 0;

function find(): (() => void) | null {
  const exposed = (globalThis as { gc?: unknown }).gc;
  if (typeof exposed === 'function') return exposed as () => void;
  try {
    setFlagsFromString('--expose-gc');
    const gc = runInNewContext('typeof gc === "function" ? gc : null') as unknown;
    return typeof gc === 'function' ? (gc as () => void) : null;
  } catch {
    return null;
  }
}

/**
 * A full collection, when the heap holds more than `above` bytes and a
 * quarter more than the last collection left (a collection that finds
 * nothing to free costs as much as one that does: 0.3 s at 400 MB).
 * Returns whether it collected.
 */
export function collectIfGrown(above = COLLECT_ABOVE): boolean {
  const used = getHeapStatistics().used_heap_size;
  if (used <= above || used < liveAfterLast * 1.25) return false;
  collector ??= find();
  if (!collector) return false;
  collector();
  liveAfterLast = getHeapStatistics().used_heap_size;
  return true;
}
