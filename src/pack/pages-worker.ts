/**
 * The worker side of `startPagesWorker`: index.md and index.html, by the
 * same function the main thread would call, so the bytes are the same.
 */
import { parentPort } from 'node:worker_threads';
import { type TextPagesInput, loadTextWriters, writeTextPagesHere } from './text-pages.ts';

// Load the writers now, while the main thread analyses; the message comes later.
void loadTextWriters();

parentPort!.once('message', async (input: TextPagesInput) => {
  const pages = await writeTextPagesHere(input);
  // Moved, not copied: a plant's SVGs are 66 MB, and a copy on each side raised the build's peak past 1 GiB.
  parentPort!.postMessage(pages, [pages.md.buffer, pages.html.buffer, ...pages.charts.map((c) => c.svg.buffer)] as ArrayBuffer[]);
});
