/**
 * index.md and index.html, written on another thread when there is one to
 * spare: both are serialisations of the pack tree (remark, rehype) that
 * need nothing the PDF layout needs in turn. On a plant's pack they take
 * about half as long as the PDF does, so that thread draws the standalone
 * SVGs too (sent as soon as their scenes are made), and the three run
 * beside the PDF.
 */
import { createHash } from 'node:crypto';
import { writeFileSync } from 'node:fs';
import { serialize } from 'node:v8';
import type { Root, RootContent } from 'mdast';
import { loadFonts } from '../render/fonts.ts';
import { type ChartJob, drawCharts } from '../render/pool/chart-pool.ts';
import type { Scene } from '../render/scene/types.ts';
import { copyingSink, folderMaker, readRange } from './write.ts';
import { type FileRange, memorySink } from './bytes.ts';
import path from 'node:path';

export interface TextPagesInput {
  /**
   * The pack tree: whole, or (with a build cache) in parts (splitParts),
   * each part as its nodes or, where an earlier build wrote it, as its
   * texts. Only a tree without footnotes goes in parts: index.html converts
   * one with footnotes whole.
   */
  readonly tree: { readonly whole: Root } | { readonly parts: readonly PagePart[] };
  readonly title: string;
  /** The scenes of the charts the tree's nodes draw (the parts given as texts need none). */
  readonly scenes: ReadonlyMap<string, Scene>;
  /** The folder to write index.md and index.html into (the pack's temporary folder); without it they come back as bytes. */
  readonly into?: string;
}

/**
 * One part of the tree: its nodes to write, or where an earlier build's
 * index.md and index.html hold its texts. Those are copied from there as
 * they are: a rebuild's main thread once read a plant's 22 MB of them from
 * the cache and sent them to the worker (0.2–0.3 s).
 */
export type PagePart = { readonly nodes: readonly RootContent[] } | { readonly known: KnownText };

export interface KnownText {
  readonly md: FileRange;
  readonly html: FileRange;
}

/** A page written into the pack's folder: its size and SHA-256, for the manifest. */
export interface WrittenPage {
  readonly bytes: number;
  readonly sha256: string;
}

/**
 * A standalone SVG the worker drew: its bytes (moved, not copied, from the
 * worker), or where it wrote them (`SvgJob.to`) with their size and
 * SHA-256 for the manifest.
 */
export type SvgFile = (
  | { readonly id: string; readonly svg: Uint8Array }
  | { readonly id: string; readonly written: { readonly bytes: number; readonly sha256: string } }
) & {
  /** The size of the scene's file, where the job asked for one (`SvgJob.sceneTo`). */
  readonly sceneBytes?: number;
};

/**
 * A chart for the worker to draw; with `to`, files (absolute paths) to
 * write its SVG to, rather than send it back; with `sceneTo`, a file to
 * write its scene to, serialised (the build cache's side file).
 */
export interface SvgJob extends ChartJob {
  readonly to?: readonly string[];
  readonly sceneTo?: string;
}

export interface TextPages {
  /** index.md and index.html: their bytes, or where `into` was given, their size and SHA-256. */
  readonly md: Uint8Array | WrittenPage;
  readonly html: Uint8Array | WrittenPage;
  /** The SVG files the worker was asked to `draw`, in their order (none when written in this thread). */
  readonly charts: readonly SvgFile[];
  /** With the tree in parts: where each part's texts went in index.md and index.html, [start, end) of each, for the cache. */
  readonly placed: readonly PlacedText[];
}

export type PlacedText = readonly [mdStart: number, mdEnd: number, htmlStart: number, htmlEnd: number];

const encoder = new TextEncoder();

/**
 * The Markdown and HTML writers (remark, rehype), loaded when first asked
 * for: a build that hands the pages to the worker never loads them on its
 * main thread, which saves that thread about 0.2 s of module loading.
 */
export const loadTextWriters = () => Promise.all([import('./html.ts'), import('./markdown.ts')]);

export async function writeTextPagesHere(input: TextPagesInput): Promise<TextPages> {
  const [{ toHtml, writeHtmlByParts }, { toMarkdown, writeMarkdownByParts }] = await loadTextWriters();
  const pageInput = { title: input.title, scenes: input.scenes, fonts: loadFonts() };
  const sinkFor = (name: string) => (input.into === undefined ? memorySink(readRange) : copyingSink(path.join(input.into, name)));
  const mdSink = sinkFor('index.md');
  const htmlSink = sinkFor('index.html');
  const placed: [number, number, number, number][] = [];
  if ('parts' in input.tree) {
    const given = input.tree.parts;
    const nodes = given.map((p) => ('nodes' in p ? p.nodes : []));
    const known = (i: number) => {
      const p = given[i]!;
      return 'known' in p ? p.known : undefined;
    };
    // The tree of the parts to write (writeHtmlByParts refuses one with footnotes).
    const tree: Root = { type: 'root', children: nodes.flat() };
    for (let i = 0; i < given.length; i++) placed.push([0, 0, 0, 0]);
    writeMarkdownByParts(nodes, (i) => known(i)?.md, () => {}, mdSink, (i, start, end) => ((placed[i]![0] = start), (placed[i]![1] = end)));
    writeHtmlByParts({ ...pageInput, tree }, { parts: nodes, known: (i) => known(i)?.html, fresh: () => {} }, htmlSink, (i, start, end) => ((placed[i]![2] = start), (placed[i]![3] = end)));
  } else {
    const tree = input.tree.whole;
    mdSink.write(encoder.encode(toMarkdown(tree)));
    htmlSink.write(encoder.encode(toHtml({ ...pageInput, tree })));
  }
  const done = (sink: typeof mdSink) => ('bytes' in sink ? sink.bytes() : sink.close());
  return { md: done(mdSink), html: done(htmlSink), charts: [], placed };
}

/**
 * The standalone SVG files of `jobs`, drawn in this thread; a job with
 * `to` is written there at once (its folders made) and hashed, and only
 * its size and SHA-256 come back.
 */
export async function drawSvgFiles(jobs: readonly SvgJob[]): Promise<SvgFile[]> {
  const drawn = await drawCharts(jobs, 0);
  const folderFor = folderMaker();
  const put = (file: string, bytes: Uint8Array) => {
    folderFor(file);
    writeFileSync(file, bytes);
  };
  return drawn.map((r, i) => {
    const svg = encoder.encode(r.svg);
    const { to, sceneTo, scene } = jobs[i]!;
    let sceneBytes: number | undefined;
    if (sceneTo !== undefined) {
      const bytes = serialize(scene);
      put(sceneTo, bytes);
      sceneBytes = bytes.length;
    }
    const withScene = sceneBytes === undefined ? {} : { sceneBytes };
    if (!to) return { id: r.id, svg, ...withScene };
    for (const file of to) put(file, svg);
    return { id: r.id, written: { bytes: svg.length, sha256: createHash('sha256').update(svg).digest('hex') }, ...withScene };
  });
}

