/**
 * The pages worker's thread, started from the main one: apart from the
 * writers it runs (text-pages.ts), so that a build can start it before it
 * loads them, as soon as the workspace is read.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { Workspace } from '../workspace/load.ts';
import { workerEntry } from '../worker-entry.ts';
import type { SvgJob, TextPages, TextPagesInput } from './text-pages.ts';
import type { FillJob, SunkFile } from './write.ts';

/**
 * What the worker is sent: optionally, a file to fill (a rebuild's
 * summary.json) and the SVGs to draw (as soon as their scenes are made),
 * then the pages.
 */
export type PagesMessage = { readonly fill: FillJob } | { readonly charts: readonly SvgJob[] } | { readonly pages: TextPagesInput };

/** What the worker answers: the filled file, or the pages (with the SVGs), or why either failed. */
export type PagesReply = { readonly filled: SunkFile } | { readonly fillFailed: string } | { readonly pages: TextPages };

/** A worker for the pages: `draw` hands it SVGs to draw, `run` the pages to write, `stop` ends it (unused or not). */
export interface PagesWorker {
  /** Fills a file's room from the files it names and hashes it (fillFile), beside what this thread does next. */
  fill(job: FillJob): Promise<SunkFile>;
  /**
   * Standalone SVGs for the worker to draw at once, before the pages come:
   * a plant's drawing then starts while this thread still builds the tree.
   * Their scenes need not be sent again with the pages.
   */
  draw(charts: readonly SvgJob[]): void;
  run(input: TextPagesInput): Promise<TextPages>;
  stop(): void;
}

/**
 * Starts the worker at once: loading its modules (remark, rehype, through
 * tsx) takes about a second, which it spends beside the analysis when
 * started with the build. A failure before `run` is kept for `run` to report.
 */
export function startPagesWorker(): PagesWorker {
  const worker = new Worker(workerEntry(import.meta.url, 'pages-worker'));
  const stop = () => void worker.terminate();
  // Each request waits for its own reply; the worker answers the fill before the pages (it takes
  // its messages in order, and fills at once).
  let filled: { resolve: (f: SunkFile) => void; reject: (e: Error) => void } | undefined;
  let pages: { resolve: (p: TextPages) => void; reject: (e: Error) => void } | undefined;
  let failed: Error | undefined;
  const fail = (e: Error) => {
    failed ??= e;
    filled?.reject(e);
    pages?.reject(e);
    filled = pages = undefined;
  };
  worker.on('error', fail);
  worker.on('exit', (code) => fail(new Error(`the page worker stopped (exit code ${code})`)));
  worker.on('message', (reply: PagesReply) => {
    if ('filled' in reply) filled?.resolve(reply.filled);
    else if ('fillFailed' in reply) filled?.reject(new Error(reply.fillFailed));
    else pages?.resolve(reply.pages);
  });
  return {
    fill: (job) =>
      new Promise<SunkFile>((resolve, reject) => {
        if (failed) return reject(failed);
        filled = { resolve, reject };
        worker.postMessage({ fill: job } satisfies PagesMessage);
      }),
    draw: (charts) => worker.postMessage({ charts } satisfies PagesMessage),
    run: (input) =>
      new Promise<TextPages>((resolve, reject) => {
        if (failed) return reject(failed);
        pages = { resolve, reject };
        worker.postMessage({ pages: input } satisfies PagesMessage);
      }).finally(stop),
    stop,
  };
}

/** A data file of more bytes than this (about 100,000 points) is a long series, for when the pages worker starts. */
const LONG_SERIES_BYTES = 4 * 2 ** 20;

/**
 * Whether a build of `ws` on `jobs` threads (default: every core) starts
 * the pages worker before its analysis, so that it has loaded its modules
 * (satori, fontkit, remark, rehype: 0.5–0.8 s) by the time charts are sent.
 * Not where a data file is long: that series' analysis is then the build's
 * peak of memory, and the idle thread's 50 MB would add to it.
 */
export function startsPagesWorkerEarly(ws: Workspace, jobs?: number): boolean {
  return Math.max(1, Math.floor(jobs ?? availableParallelism())) > 1 && !ws.characteristics.some((c) => 'bytes' in c.data && c.data.bytes.length > LONG_SERIES_BYTES);
}
