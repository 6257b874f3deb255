/**
 * The worker side of `startPagesWorker`: index.md and index.html, by the
 * same function the main thread would call, so the bytes are the same.
 */
import { parentPort } from 'node:worker_threads';
import { type TextPagesInput, writeTextPagesHere } from './text-pages.ts';

parentPort!.once('message', (input: TextPagesInput) => {
  const pages = writeTextPagesHere(input);
  parentPort!.postMessage(pages, [pages.md.buffer as ArrayBuffer, pages.html.buffer as ArrayBuffer]);
});
