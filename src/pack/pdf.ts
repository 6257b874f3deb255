/**
 * pack.pdf, laid out from the same mdast tree as index.md and index.html:
 * a cover, a contents page with working links, then every section in the
 * same order, each level-2 section on a new page. Charts are drawn as
 * vectors from their scenes; tables break between rows and repeat their
 * header. Output is byte-identical for identical inputs: the document dates
 * are the build date and nothing random is written.
 *
 * Since every level-2 heading starts a page, the tree falls into parts (a
 * level-2 heading and what follows it) whose pages do not depend on one
 * another: each part is laid out alone into sheets, content streams that
 * name fonts and glyphs the same in any document (pdf-ink.ts), and the
 * document is then assembled from them, with page numbers, the contents
 * page's numbers and the links added last. A part laid out by an earlier
 * build (the build cache) is used as it is.
 */
import { deflateSync } from 'node:zlib';
import type { Code, Heading, List, PhrasingContent, Root, RootContent, Table } from 'mdast';
import { rgb } from '../render/pdf-color.ts';
import { fontkit } from '../render/fontkit.ts';
import { type PdfFaces, drawScene } from '../render/pdf-chart.ts';
import { writeWholeFont } from '../render/pdf-font.ts';
import { PdfFile, array, asciiString, dateString, dict, num, ref, textString } from './pdf-file.ts';
import { type Face, SheetInk, opacityKey, textWidth } from '../render/pdf-ink.ts';
import type { Scene } from '../render/scene/types.ts';
import { chartIdOf, plain } from './mdast.ts';
import { splitParts } from './parts.ts';

export const PAPER = { a4: [595.28, 841.89], letter: [612, 792] } as const;
export type Paper = keyof typeof PAPER;

export interface PdfInput {
  readonly tree: Root;
  readonly title: string;
  readonly subject: string;
  readonly author: string;
  readonly asOf: string;
  readonly paper: Paper;
  readonly scenes: Scenes;
  readonly fonts: { readonly regular: Uint8Array; readonly semibold: Uint8Array };
  readonly producer: string;
  /** A part laid out by an earlier build, if one is known for part `index` (nodes as splitParts gives them). */
  readonly reuse?: (index: number, nodes: readonly RootContent[]) => LaidOutPart | undefined;
}

/** One part's pages, ready to join a document: plain data, kept in the build cache. */
/** The charts' scenes by chart id (a Map will do; a rebuild's reads each one only when a part that draws it is laid out). */
export type Scenes = Pick<ReadonlyMap<string, Scene>, 'get'>;

export interface LaidOutPart {
  /** Each page's content stream, Flate-compressed. */
  readonly sheets: readonly Uint8Array[];
  /** Fill and stroke opacities the sheets use (graphics states the document must define). */
  readonly opacities: readonly number[];
  /** Heading ids and where they are: the sheet (within the part) and the top of the heading. */
  readonly anchors: readonly (readonly [id: string, sheet: number, y: number])[];
  /** Internal links on the sheets, to heading ids. */
  readonly links: readonly LinkBox[];
  /** Glyphs whose text is not what the fonts' cmaps give (ligatures, alternate forms): [face key, glyph number, text]. */
  readonly shaped: readonly (readonly [face: string, glyph: number, text: string])[];
  /** Contents entries: the line's sheet and top, and the heading it lists (its page number is added when pages are known). */
  readonly contentsLines: readonly { readonly sheet: number; readonly y: number; readonly target: string }[];
}

const MARGIN = { left: 50, right: 50, top: 54, bottom: 58 };
const INK = rgb(0.12, 0.12, 0.12);
const MUTED = rgb(0.36, 0.36, 0.36);
const RULE = rgb(0.8, 0.8, 0.8);
const LINK = rgb(0, 0.376, 0.627);
const CODE_BACKGROUND = rgb(0.953, 0.953, 0.941);

interface Run {
  readonly text: string;
  readonly bold: boolean;
  readonly link?: string;
  readonly code?: boolean;
}

interface LinkBox {
  /** The sheet within its part while laid out; the page within the document when assembled. */
  readonly page: number;
  readonly rect: readonly [number, number, number, number];
  readonly target: string;
}

/** Strip control characters that a PDF text operator would carry literally. */
const clean = (s: string) => s.replace(/[\u0000-\u0008\u000b-\u001f\u007f]/g, '').replace(/\t/g, ' ');

function runsOf(nodes: readonly PhrasingContent[], bold = false, link?: string): Run[] {
  const out: Run[] = [];
  for (const n of nodes) {
    switch (n.type) {
      case 'text':
        out.push({ text: clean(n.value), bold, ...(link ? { link } : {}) });
        break;
      case 'inlineCode':
        out.push({ text: clean(n.value), bold, code: true, ...(link ? { link } : {}) });
        break;
      case 'strong':
        out.push(...runsOf(n.children, true, link));
        break;
      case 'emphasis':
      case 'delete':
        out.push(...runsOf(n.children, bold, link));
        break;
      case 'link':
        out.push(...runsOf(n.children, bold, n.url));
        break;
      case 'break':
        out.push({ text: '\n', bold });
        break;
      default:
        if ('children' in n) out.push(...runsOf(n.children as PhrasingContent[], bold, link));
    }
  }
  return out;
}

/** The glyphs that sheets drew whose text the cmaps do not give, each once, in a fixed order. */
function shapedOf(sheets: readonly SheetInk[]): [string, number, string][] {
  const all = new Map<string, [string, number, string]>();
  for (const s of sheets) for (const [face, m] of s.shaped) for (const [g, t] of m) if (!all.has(`${face} ${g}`)) all.set(`${face} ${g}`, [face, g, t]);
  return [...all.values()].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : a[1] - b[1]));
}

interface LayoutContext {
  readonly paper: Paper;
  readonly scenes: Scenes;
  readonly faces: PdfFaces;
}

/** The faces of the pack's two fonts, under the resource names every sheet uses. */
function facesOf(fonts: PdfInput['fonts']): PdfFaces {
  return { regular: { key: 'F0', font: fontkit.create(fonts.regular) }, semibold: { key: 'F1', font: fontkit.create(fonts.semibold) } };
}

// pdf-lib shapes the text on every width query; tables and wrapping ask
// for the same words again and again, so widths at size 1 are remembered.
const widthCache = new WeakMap<Face, Map<string, number>>();

/**
 * Lays out one part (its first node a level-2 heading, or the cover part:
 * `first`) from the top of a new page.
 */
export function layoutPart(nodes: readonly RootContent[], first: boolean, context: LayoutContext): LaidOutPart {
  const { regular, semibold } = context.faces;
  const [pageW, pageH] = PAPER[context.paper];
  const width = pageW - MARGIN.left - MARGIN.right;
  const pages: SheetInk[] = [];
  const anchors: [string, number, number][] = [];
  const links: LinkBox[] = [];
  const contentsLines: { sheet: number; y: number; target: string }[] = [];
  let page!: SheetInk;
  let y = 0;

  const newPage = () => {
    page = new SheetInk();
    pages.push(page);
    y = pageH - MARGIN.top;
  };
  const ensure = (h: number) => {
    if (y - h < MARGIN.bottom) newPage();
  };
  const fontOf = (r: Run): Face => (r.bold ? semibold : regular);
  const widthOf = (face: Face, text: string, size: number): number => {
    let cache = widthCache.get(face);
    if (!cache) widthCache.set(face, (cache = new Map()));
    let w = cache.get(text);
    if (w === undefined) {
      w = textWidth(face.font, text, 1);
      cache.set(text, w);
    }
    return w * size;
  };

  type Word = { text: string; run: Run; w: number; space: number };

  /** Breaks runs into lines no wider than `maxW`; words longer than a line (ids, hashes) break by characters. */
  const wrap = (runs: readonly Run[], width: number, size: number): Word[][] => {
    // Column widths are sums of measured widths; allow for rounding so a word measured to fit does fit.
    const maxW = width + 0.01;
    const words: (Word | 'newline')[] = [];
    for (const r of runs) {
      const f = fontOf(r);
      for (const part of r.text.split(/(\n| +)/)) {
        if (part === '') continue;
        if (part === '\n') words.push('newline');
        else if (/^ +$/.test(part)) {
          const last = words[words.length - 1];
          if (last && last !== 'newline') last.space = widthOf(f, ' ', size);
        } else if (widthOf(f, part, size) <= maxW) words.push({ text: part, run: r, w: widthOf(f, part, size), space: 0 });
        else {
          let chunk = '';
          for (const ch of part) {
            if (chunk && widthOf(f, chunk + ch, size) > maxW) {
              words.push({ text: chunk, run: r, w: widthOf(f, chunk, size), space: 0 });
              chunk = '';
            }
            chunk += ch;
          }
          words.push({ text: chunk, run: r, w: widthOf(f, chunk, size), space: 0 });
        }
      }
    }
    const lines: Word[][] = [[]];
    let lineW = 0;
    for (const w of words) {
      if (w === 'newline') {
        lines.push([]);
        lineW = 0;
        continue;
      }
      const line = lines[lines.length - 1]!;
      const prev = line[line.length - 1];
      const needed = (prev ? prev.space : 0) + w.w;
      if (line.length > 0 && lineW + needed > maxW) {
        lines.push([w]);
        lineW = w.w;
      } else {
        line.push(w);
        lineW += needed;
      }
    }
    return lines;
  };

  /** Draws one line with its top at `top`; internal links become link boxes. */
  const drawLine = (line: readonly Word[], x: number, top: number, size: number, color = INK) => {
    let lx = x;
    const base = top - size * 0.95;
    // Words of one run are drawn as one string: pdf-lib shapes every string it draws.
    for (let i = 0; i < line.length; ) {
      const run = line[i]!.run;
      let j = i;
      let textOut = '';
      let w = 0;
      while (j < line.length && line[j]!.run === run) {
        const word = line[j]!;
        const last = j + 1 === line.length || line[j + 1]!.run !== run;
        textOut += word.text + (last ? '' : ' ');
        w += word.w + (last ? 0 : word.space);
        j++;
      }
      const internal = run.link?.startsWith('#');
      page.text(textOut, lx, base, size, fontOf(run), internal ? LINK : color);
      if (internal) links.push({ page: pages.length - 1, rect: [lx, base - 2, lx + w, base + size], target: run.link!.slice(1) });
      lx += w + line[j - 1]!.space;
      i = j;
    }
  };

  /** Lines that may break across pages, keeping at least two together at a page foot. */
  const flowLines = (lines: readonly Word[][], x: number, size: number, lead: number, color = INK) => {
    ensure(Math.min(lines.length, 2) * lead);
    for (const line of lines) {
      ensure(lead);
      drawLine(line, x, y, size, color);
      y -= lead;
    }
  };

  /** A block of lines kept together (table cells, headings), drawn from `top`; returns its height. */
  const flow = (runs: readonly Run[], x: number, maxW: number, size: number, lead: number, color = INK, measureOnly = false, top = y): number => {
    const lines = wrap(runs, maxW, size);
    if (!measureOnly) lines.forEach((line, k) => drawLine(line, x, top - k * lead, size, color));
    return lines.length * lead;
  };

  const paragraphBlock = (runs: readonly Run[], x: number, maxW: number, size = 9.5, color = INK) => {
    flowLines(wrap(runs, maxW, size), x, size, size * 1.4, color);
    y -= size * 0.6;
  };

  const headingBlock = (h: Heading) => {
    const size = h.depth === 1 ? 22 : h.depth === 2 ? 15 : 11.5;
    if (h.depth === 2 && y < pageH - MARGIN.top - 1) newPage();
    // The cover's title sits a third of the way down its page.
    if (h.depth === 1 && first && pages.length === 1 && y >= pageH - MARGIN.top - 1) y = pageH * 0.7;
    ensure(size * 1.3 + 70);
    const id = (h.data?.hProperties as { id?: string } | undefined)?.id;
    if (id) anchors.push([id, pages.length - 1, y + 4]);
    if (h.depth > 1) y -= h.depth === 2 ? 0 : 6;
    const used = flow(runsOf(h.children, true), MARGIN.left, width, size, size * 1.25);
    y -= used;
    if (h.depth === 2) {
      page.line(MARGIN.left, y - 2, MARGIN.left + width, y - 2, 1.2, INK);
      y -= 12;
    } else y -= 4;
  };

  const listBlock = (l: List, x: number, maxW: number, contents: boolean) => {
    l.children.forEach((item, k) => {
      for (const child of item.children) {
        if (child.type === 'paragraph') {
          const runs = runsOf(child.children);
          if (contents) {
            ensure(16);
            const target = runs.find((r) => r.link)?.link?.slice(1);
            // The whole line links to its section (added below with the page number), so the words carry no link of their own.
            flow(runs.map((r) => ({ text: r.text, bold: r.bold })), x, maxW - 40, 10.5, 15);
            if (target) contentsLines.push({ sheet: pages.length - 1, y, target });
            y -= 16;
            continue;
          }
          const size = 9.5;
          const lines = wrap(runs, maxW - 12, size);
          ensure(Math.min(lines.length, 2) * size * 1.4);
          page.text(l.ordered ? `${k + 1}.` : '•', x, y - size * 0.95, size, regular, MUTED);
          flowLines(lines, x + 12, size, size * 1.4);
          y -= 2;
        } else if (child.type === 'list') listBlock(child, x + 12, maxW - 12, false);
        else block(child, x + 12, maxW - 12);
      }
    });
    y -= 5;
  };

  const codeBlock = (c: Code, x: number, maxW: number) => {
    const size = 7.5;
    const lead = size * 1.35;
    const lines = c.value.split('\n').flatMap((raw) => wrap([{ text: clean(raw), bold: false, code: true }], maxW - 12, size));
    ensure(Math.min(lines.length, 2) * lead + 6);
    y -= 3;
    for (const line of lines) {
      ensure(lead);
      page.rect(x, y - lead - 1, maxW, lead + 2, CODE_BACKGROUND);
      drawLine(line, x + 6, y, size);
      y -= lead;
    }
    y -= 12;
  };

  const tableBlock = (t: Table, x: number, maxW: number) => {
    const size = 8;
    const lead = size * 1.3;
    const pad = 3;
    const rows = t.children.map((r, k) => r.children.map((c) => runsOf(c.children, k === 0)));
    const cols = Math.max(...rows.map((r) => r.length));
    const natural = Array.from({ length: cols }, (_, j) =>
      Math.max(...rows.map((r) => (r[j] ?? []).reduce((s, run) => s + widthOf(fontOf(run), run.text, size), 0) + 2 * pad)),
    );
    const minimum = Array.from({ length: cols }, (_, j) =>
      Math.max(
        24,
        ...rows.map((r) => Math.max(0, ...(r[j] ?? []).flatMap((run) => run.text.split(/\s+/).map((w) => widthOf(fontOf(run), w, size)))) + 2 * pad),
      ),
    );
    // Columns get their natural width when everything fits; otherwise the
    // space above each column's longest word is shared by natural width.
    let widths = natural.slice();
    const total = natural.reduce((a, b) => a + b, 0);
    if (total > maxW) {
      const fair = minimum.reduce((a, b) => a + b, 0) <= maxW ? minimum : minimum.map((m) => Math.min(m, maxW / cols));
      const floor = fair;
      const spare = Math.max(0, maxW - floor.reduce((a, b) => a + b, 0));
      const extra = natural.map((n, j) => Math.max(0, n - floor[j]!));
      const extraTotal = extra.reduce((a, b) => a + b, 0) || 1;
      widths = floor.map((f, j) => f + (spare * extra[j]!) / extraTotal);
    } else {
      const stretch = (maxW - total) / cols;
      widths = natural.map((n) => n + stretch);
    }
    const align = t.align ?? [];
    const heightOf = (r: Run[][]) => Math.max(lead, ...r.map((cell, j) => flow(cell, 0, widths[j]! - 2 * pad, size, lead, INK, true))) + 2 * pad;
    const drawRow = (r: Run[][], header: boolean) => {
      const h = heightOf(r);
      let cx = x;
      r.forEach((cell, j) => {
        const w = widths[j]!;
        const textW = cell.reduce((s, run) => s + widthOf(fontOf(run), run.text, size), 0);
        const right = align[j] === 'right' && textW <= w - 2 * pad;
        flow(cell, right ? cx + w - pad - textW : cx + pad, w - 2 * pad, size, lead, INK, false, y - pad);
        cx += w;
      });
      y -= h;
      page.line(x, y, x + maxW, y, header ? 0.9 : 0.4, header ? INK : RULE);
    };
    const [head, ...body] = rows;
    if (!head) return;
    ensure(heightOf(head) + (body[0] ? heightOf(body[0]) : 0));
    drawRow(head, true);
    for (const r of body) {
      const h = heightOf(r);
      if (y - h < MARGIN.bottom) {
        newPage();
        drawRow(head, true);
      }
      drawRow(r, false);
    }
    y -= 10;
  };

  const chartBlock = (scene: Scene, x: number, maxW: number) => {
    const scale = Math.min(1, maxW / scene.width);
    const h = scene.height * scale;
    ensure(h + 6);
    drawScene(page, scene, { x, top: y, scale }, context.faces);
    y -= h + 8;
  };

  let inContents = false;
  const block = (node: RootContent, x = MARGIN.left, maxW = width) => {
    switch (node.type) {
      case 'heading': {
        headingBlock(node);
        inContents = (node.data?.hProperties as { id?: string } | undefined)?.id === 'contents';
        break;
      }
      case 'paragraph': {
        const chartId = chartIdOf(node);
        if (chartId) {
          const scene = context.scenes.get(chartId);
          if (scene) chartBlock(scene, x, maxW);
          break;
        }
        paragraphBlock(runsOf(node.children), x, maxW);
        break;
      }
      case 'list':
        listBlock(node, x, maxW, inContents);
        break;
      case 'code':
        codeBlock(node, x, maxW);
        break;
      case 'table':
        tableBlock(node, x, maxW);
        break;
      case 'blockquote':
        for (const c of node.children) block(c, x + 12, maxW - 12);
        break;
      case 'thematicBreak':
        ensure(12);
        page.line(x, y - 6, x + maxW, y - 6, 0.5, RULE);
        y -= 12;
        break;
      case 'html':
        // Raw HTML is never rendered (the HTML pack drops it too).
        break;
      default:
        if ('children' in node) paragraphBlock([{ text: plain(node as { type: string; children: unknown[] }), bold: false }], x, maxW);
    }
  };

  newPage();
  for (const node of nodes) block(node);
  return partOf(pages, anchors, links, contentsLines);
}

/**
 * Drawn sheets as a part: compressed here, so that a part kept in the cache
 * is ready to write. zlib's level 4, not its default 6: a plant's 2,194
 * sheets (42 MB of operators) took 0.47 s against 0.72–0.81 s, for 8.95 MB
 * against 8.43 MB (scratch measurement, both levels run twice).
 */
const SHEET_LEVEL = 4;

/** A page's own additions (its footer's number, a contents page's numbers) up to this many bytes are written uncompressed: zlib's set-up costs more than it saves on a few dozen bytes. */
const SMALL_STREAM = 512;

function partOf(sheets: readonly SheetInk[], anchors: LaidOutPart['anchors'], links: LaidOutPart['links'], contentsLines: LaidOutPart['contentsLines']): LaidOutPart {
  const opacities = new Set<number>();
  for (const s of sheets) for (const o of s.opacities) opacities.add(o);
  return {
    shaped: shapedOf(sheets),
    sheets: sheets.map((s) => new Uint8Array(deflateSync(s.content(), { level: SHEET_LEVEL }))),
    opacities: [...opacities].sort((a, b) => a - b),
    anchors,
    links,
    contentsLines,
  };
}

/** pack.pdf, in the pieces it was gathered in (`pieces`, joined: the file), and its parts as laid out. */
export async function toPdf(input: PdfInput): Promise<{ pieces: readonly Uint8Array[]; parts: LaidOutPart[] }> {
  const faces = facesOf(input.fonts);
  const context: LayoutContext = { paper: input.paper, scenes: input.scenes, faces };
  const parts = splitParts(input.tree).map((nodes, i) => input.reuse?.(i, nodes) ?? layoutPart(nodes, i === 0, context));
  const asOf = dateString(new Date(`${input.asOf}T00:00:00Z`));
  const pieces = assemble(parts, input.fonts, faces, PAPER[input.paper], clean(input.title), {
    Title: textString(clean(input.title)),
    Author: textString(clean(input.author)),
    Subject: textString(clean(input.subject)),
    Creator: textString(input.producer),
    Producer: textString(input.producer),
    CreationDate: asOf,
    ModDate: asOf,
  });
  return { pieces, parts };
}

/**
 * One chart on a page of its own size, through the pack's own drawing and
 * assembly (tests and the benchmark read it back).
 */
export async function scenePdf(scene: Scene, fonts: PdfInput['fonts']): Promise<Uint8Array> {
  const faces = facesOf(fonts);
  const ink = new SheetInk();
  drawScene(ink, scene, { x: 20, top: scene.height + 20, scale: 1 }, faces);
  return Buffer.concat(assemble([partOf([ink], [], [], [])], fonts, faces, [scene.width + 40, scene.height + 40], null, {}));
}

/**
 * The document from the parts, in order: its pages, with the fonts, one
 * resource dictionary, the contents page's numbers, the links and, where
 * `footer` is given, a footer with it and the page number on every page;
 * `info` is the document information dictionary's entries (§14.3.3).
 */
function assemble(
  parts: readonly LaidOutPart[],
  fonts: PdfInput['fonts'],
  faces: PdfFaces,
  size: readonly [number, number],
  footer: string | null,
  info: Readonly<Record<string, string>>,
): readonly Uint8Array[] {
  const file = new PdfFile();
  const pagesRoot = file.reserve();
  const catalog = file.add(dict({ Type: '/Catalog', Pages: ref(pagesRoot), ViewerPreferences: dict({ DisplayDocTitle: 'true' }), Lang: asciiString('en') }));
  const infoRef = file.add(dict(info));
  // The fonts are written once what the pages draw is known (pdf-font.ts); the pages refer to them before.
  const fontRefs = { F0: file.reserve(), F1: file.reserve() };
  const fontDict = dict({ F0: ref(fontRefs.F0), F1: ref(fontRefs.F1) });
  const [pageW, pageH] = size;
  const width = pageW - MARGIN.left - MARGIN.right;
  const mediaBox = array(['0', '0', num(pageW), num(pageH)]);
  // One resource dictionary for every page: the two fonts, each opacity's graphics state and the
  // footer's forms (written last, once the forms are known).
  const opacities = [...new Set(parts.flatMap((p) => p.opacities))].sort((a, b) => a - b);
  const states = opacities.map((o) => [opacityKey(o), file.add(dict({ Type: '/ExtGState', ca: num(o), CA: num(o) }))] as const);
  const resources = file.reserve();
  const anchors = new Map<string, { page: number; y: number }>();
  const links: LinkBox[] = [];
  const contentsLines: { page: number; y: number; target: string }[] = [];
  // Page objects are numbered now (links point at pages of later parts) and written at the end.
  const pageRefs: number[] = [];
  const bodies: number[] = [];
  for (const part of parts) {
    const first = pageRefs.length;
    for (const sheet of part.sheets) {
      pageRefs.push(file.reserve());
      bodies.push(file.stream({ Filter: '/FlateDecode' }, sheet));
    }
    // The first anchor of an id wins, as before.
    for (const [id, sheet, y] of part.anchors) if (!anchors.has(id)) anchors.set(id, { page: first + sheet, y });
    for (const l of part.links) links.push({ ...l, page: first + l.page });
    for (const c of part.contentsLines) contentsLines.push({ page: first + c.sheet, y: c.y, target: c.target });
  }
  const extras = pageRefs.map(() => new SheetInk());
  // Each page's footer measures the same few strings again (a plant's pack has 3,000 pages): each
  // is measured once, by the same function, so the bytes are those of measuring it every time.
  const widths = new Map<string, number>();
  const widthOf = (face: Face, text: string, size: number) => {
    const key = `${face.key} ${size} ${text}`;
    let w = widths.get(key);
    if (w === undefined) widths.set(key, (w = textWidth(face.font, text, size)));
    return w;
  };
  const shortened = new Map<number, string>();
  // The footer's title is the same on every page: drawn once, as a form each page draws (one per
  // shortening of it), so that a page's own footer is its number alone, too short to be worth
  // compressing. Compressing 2,194 footers one by one took 0.15–0.2 s of a plant's rebuild.
  const titleForms = new Map<string, { name: string; ink: SheetInk; ref: number }>();
  const formOf = (title: string) => {
    let form = titleForms.get(title);
    if (!form) {
      const ink = new SheetInk();
      ink.text(title, MARGIN.left, MARGIN.bottom - 26, 8, faces.regular, MUTED, true);
      const content = deflateSync(ink.content());
      form = { name: `T${titleForms.size}`, ink, ref: file.stream({ Type: '/XObject', Subtype: '/Form', BBox: mediaBox, Resources: dict({ Font: fontDict }), Filter: '/FlateDecode' }, content) };
      titleForms.set(title, form);
    }
    return form.name;
  };

  // Contents page numbers and every internal link, now that pages are known.
  for (const line of contentsLines) {
    const target = anchors.get(line.target);
    if (!target) continue;
    const label = String(target.page + 1);
    // line.y is the top of the entry's line; its baseline sits 0.95 of the size below.
    extras[line.page]!.text(label, MARGIN.left + width - widthOf(faces.regular, label, 10.5), line.y - 10.5 * 0.95, 10.5, faces.regular, INK);
    links.push({ page: line.page, rect: [MARGIN.left, line.y - 14, MARGIN.left + width, line.y + 1], target: line.target });
  }
  const annots = pageRefs.map((): number[] => []);
  for (const l of links) {
    const target = anchors.get(l.target);
    if (!target) continue;
    const annot = dict({
      Type: '/Annot',
      Subtype: '/Link',
      Rect: array(l.rect.map(num)),
      Border: '[ 0 0 0 ]',
      Dest: array([ref(pageRefs[target.page]!), '/XYZ', 'null', num(target.y), 'null']),
    });
    annots[l.page]!.push(file.add(annot));
  }
  pageRefs.forEach((page, i) => {
    const ink = extras[i]!;
    if (footer !== null) {
      const n = `Page ${i + 1} of ${pageRefs.length}`;
      ink.text(n, MARGIN.left + width - widthOf(faces.regular, n, 8), MARGIN.bottom - 26, 8, faces.regular, MUTED);
      const maxTitle = width - widthOf(faces.regular, n, 8) - 20;
      let title = shortened.get(maxTitle);
      if (title === undefined) {
        let t = footer;
        while (t && textWidth(faces.regular.font, t, 8) > maxTitle) t = t.slice(0, -2);
        shortened.set(maxTitle, (title = t === footer ? t : `${t}…`));
      }
      ink.form(formOf(title));
    }
    const contents = [ref(bodies[i]!)];
    if (!ink.empty) {
      const drawn = Buffer.from(ink.content(), 'latin1');
      contents.push(ref(drawn.length > SMALL_STREAM ? file.stream({ Filter: '/FlateDecode' }, deflateSync(drawn)) : file.stream({}, drawn)));
    }
    file.put(
      page,
      dict({ Type: '/Page', Parent: ref(pagesRoot), Resources: ref(resources), MediaBox: mediaBox, Contents: array(contents), Annots: annots[i]!.length ? array(annots[i]!.map(ref)) : undefined }),
    );
  });
  file.put(pagesRoot, dict({ Type: '/Pages', Kids: array(pageRefs.map(ref)), Count: String(pageRefs.length) }));
  const named = (entries: readonly (readonly [string, number])[]) => dict(Object.fromEntries(entries.map(([k, n]) => [k, ref(n)])));
  file.put(
    resources,
    dict({
      Font: fontDict,
      ExtGState: states.length ? named(states) : undefined,
      XObject: titleForms.size ? named([...titleForms.values()].map((f) => [f.name, f.ref] as const)) : undefined,
    }),
  );
  // Glyphs shaping made, with their text; the first part that drew one names it.
  const shaped = { F0: new Map<number, string>(), F1: new Map<number, string>() };
  for (const [face, g, t] of [...parts.flatMap((p) => p.shaped), ...shapedOf([...extras, ...[...titleForms.values()].map((f) => f.ink)])]) if ((face === 'F0' || face === 'F1') && !shaped[face].has(g)) shaped[face].set(g, t);
  writeWholeFont(file, fonts.regular, faces.regular.font, shaped.F0, fontRefs.F0);
  writeWholeFont(file, fonts.semibold, faces.semibold.font, shaped.F1, fontRefs.F1);
  return file.finishInPieces(catalog, infoRef);
}
