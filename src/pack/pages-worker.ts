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
import { loadFonts } from '../render/fonts.ts';

// Load the chart drawing and the writers now, while the main thread analyses; the messages come later.
// satori also reads the fonts now, with one label's glyph (one every chart has), so that a rebuild's
// one chart does not wait for it (0.2–0.3 s of the worker's path, when the main thread had waited).
void loadChartDrawing()
  .then(({ labelPathsFor }) => labelPathsFor(loadFonts()).prepare([{ text: '0', size: 10, weight: 400 }]))
  .then(loadTextWriters)
  // A failure here comes back where the module or the fonts are next used, with the message that asked.
  .catch(() => {});

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
