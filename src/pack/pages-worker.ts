/**
 * The worker side of `startPagesWorker`: index.md and index.html, by the
 * same function the main thread would call, so the bytes are the same; the
 * standalone SVGs, from the moment they are sent; and a file to fill.
 */
import { parentPort } from 'node:worker_threads';
import type { Scene } from '../render/scene/types.ts';
import { type SvgFile, drawSvgFiles, loadTextWriters, writeTextPagesHere } from './text-pages.ts';
import type { PagesMessage, PagesReply } from './pages-thread.ts';
import { fillFile } from './write.ts';
import { loadChartDrawing } from '../render/pool/chart-pool.ts';

// Load the chart drawing and the writers now, while the main thread analyses; the messages come later.
void loadChartDrawing().then(loadTextWriters);

let drawing: Promise<SvgFile[]> | undefined;
const sent = new Map<string, Scene>();

parentPort!.on('message', async (message: PagesMessage) => {
  if ('fill' in message) {
    let reply: PagesReply;
    try {
      reply = { filled: fillFile(message.fill) };
    } catch (e) {
      reply = { fillFailed: e instanceof Error ? e.message : String(e) };
    }
    parentPort!.postMessage(reply);
    return;
  }
  if ('charts' in message) {
    for (const job of message.charts) sent.set(job.id, job.scene);
    // Charts may come in several messages (as the main thread lays them out): drawn in turn, in order.
    const before = drawing;
    const charts = message.charts;
    drawing = (async () => [...(before ? await before : []), ...(await drawSvgFiles(charts))])();
    // A failure is reported with the pages, when the drawing is waited for.
    drawing.catch(() => {});
    return;
  }
  const input = message.pages;
  const pages = await writeTextPagesHere({ ...input, scenes: new Map([...sent, ...input.scenes]) });
  const charts = drawing ? await drawing : [];
  const reply = { ...pages, charts };
  const answer: PagesReply = { pages: reply };
  // Moved, not copied: a plant's SVGs are 66 MB, and a copy on each side raised the build's peak past 1 GiB.
  parentPort!.postMessage(answer, [...[reply.md, reply.html].flatMap((p) => (p instanceof Uint8Array ? [p.buffer] : [])), ...reply.charts.flatMap((c) => ('svg' in c ? [c.svg.buffer] : []))] as ArrayBuffer[]);
});
