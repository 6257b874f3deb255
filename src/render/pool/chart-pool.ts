/**
 * Drawing charts on other cores. The standalone SVG (satori) and the PNG
 * (resvg) of each chart need only its scene, so worker threads can draw
 * them while the main thread lays out the pages, which need only the scenes
 * too. build.ts uses workers for PNG builds, where the drawing is heavy
 * enough to pay for them; with none, everything is drawn in this thread.
 *
 * The output does not depend on the number of jobs: each chart's drawing
 * is a pure function of its scene (labels are laid out the same in any
 * batch; see svg-satori.ts), and results are put back in the charts' order.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { loadFonts } from '../fonts.ts';
import { svgToPng } from '../png.ts';
import type { Scene } from '../scene/types.ts';
import { workerEntry } from '../../worker-entry.ts';

export interface ChartJob {
  readonly id: string;
  readonly scene: Scene;
  readonly png: boolean;
}

export interface ChartResult {
  readonly id: string;
  readonly svg: string;
  readonly png: Uint8Array | null;
}

/** The default --jobs: every core the process may use. */
export const defaultJobs = (): number => availableParallelism();

/** Charts a worker is sent at a time: enough to amortise a message, few enough to share the work out evenly. */
const BATCH = 25;

/** The labels of every chart in `jobs`. */
export const labelsOf = (jobs: readonly ChartJob[]) => jobs.flatMap((j) => j.scene.items.filter((p) => p.kind === 'text'));

/**
 * satori and the SVG writer, loaded when charts are first drawn in this
 * thread: a build whose charts are drawn on other threads never loads them
 * here (about 0.1 s of the main thread's start); a thread that will draw may load
 * them early, while it waits.
 */
export const loadChartDrawing = () => import('../svg-satori.ts');

async function drawHere(jobs: readonly ChartJob[], onDone: (n: number) => void): Promise<ChartResult[]> {
  const { labelPathsFor, renderStandaloneSvg } = await loadChartDrawing();
  const fonts = loadFonts();
  const out: ChartResult[] = [];
  // Every new label in a few large satori calls, not one call per chart.
  await labelPathsFor(fonts).prepare(labelsOf(jobs));
  for (const job of jobs) {
    const svg = await renderStandaloneSvg(job.scene, fonts);
    out.push({ id: job.id, svg, png: job.png ? svgToPng(svg, [fonts.regularPath, fonts.semiboldPath], job.scene.width * 2) : null });
    onDone(1);
  }
  return out;
}

/**
 * Draws every job on `workers` worker threads (none: in this thread).
 * Resolves with the results in the jobs' order.
 */
export async function drawCharts(jobs: readonly ChartJob[], workers: number, onDone: (n: number) => void = () => {}): Promise<ChartResult[]> {
  if (workers <= 0 || jobs.length === 0) return drawHere(jobs, onDone);
  const batches: ChartJob[][] = [];
  for (let i = 0; i < jobs.length; i += BATCH) batches.push(jobs.slice(i, i + BATCH));
  const results: ChartResult[][] = new Array(batches.length);
  let next = 0;
  const pool = Array.from({ length: Math.min(workers, batches.length) }, () => new Worker(workerEntry(import.meta.url, 'chart-worker')));
  try {
    await Promise.all(
      pool.map(
        (worker) =>
          new Promise<void>((resolve, reject) => {
            let current = -1;
            const send = () => {
              if (next >= batches.length) return resolve();
              current = next++;
              worker.postMessage(batches[current]);
            };
            worker.on('message', (r: ChartResult[]) => {
              results[current] = r;
              onDone(r.length);
              send();
            });
            worker.on('error', reject);
            worker.on('exit', (code) => (current < batches.length && results[current] === undefined ? reject(new Error(`a chart worker stopped (exit code ${code})`)) : undefined));
            send();
          }),
      ),
    );
  } finally {
    await Promise.all(pool.map((w) => w.terminate()));
  }
  return results.flat();
}
