/**
 * A worker thread's side of the chart pool: draws the standalone SVG (and
 * the PNG when asked) of each scene it is sent, with its own label cache.
 */
import { parentPort } from 'node:worker_threads';
import { loadFonts } from '../fonts.ts';
import { svgToPng } from '../png.ts';
import { labelPathsFor, renderStandaloneSvg } from '../svg-satori.ts';
import { labelsOf } from './chart-pool.ts';
import type { ChartJob, ChartResult } from './chart-pool.ts';

const fonts = loadFonts();
const port = parentPort!;

port.on('message', async (jobs: readonly ChartJob[]) => {
  const results: ChartResult[] = [];
  // Every new label of the batch in one satori call or a few, not one call per chart.
  await labelPathsFor(fonts).prepare(labelsOf(jobs));
  for (const job of jobs) {
    const svg = await renderStandaloneSvg(job.scene, fonts);
    const png = job.png ? svgToPng(svg, [fonts.regularPath, fonts.semiboldPath], job.scene.width * 2) : null;
    results.push({ id: job.id, svg, png });
  }
  port.postMessage(results, results.flatMap((r) => (r.png ? [r.png.buffer as ArrayBuffer] : [])));
});
