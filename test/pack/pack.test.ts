/**
 * The review pack built from the demo workspace, checked by parsing each
 * output with a tool outside plumbline: the HTML with a real HTML parser
 * (hast-util-from-html, parse5 underneath), the Markdown with remark, the
 * PDF with poppler (pdftotext, pdfinfo) and qpdf --check.
 */
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Element, Root as HastRoot } from 'hast';
import { fromHtml } from 'hast-util-from-html';
import type { Root } from 'mdast';
import remarkGfm from 'remark-gfm';
import remarkParse from 'remark-parse';
import { unified } from 'unified';
import { visit } from 'unist-util-visit';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type PlannedPack, planPack } from '../../src/build.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';
import { pdfinfo, pdftotext, streams } from '../helpers/pdf.ts';

const DEMO = path.join(import.meta.dirname, '../../data/demo');
const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-pack-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));

const loaded = loadWorkspace(DEMO);
if (!loaded.ok) throw new Error('demo does not load');
const ws = loaded.workspace;
const ids = ws.config.characteristics.map((c) => c.id);
const names = ws.config.characteristics.map((c) => c.name);
const text = (b: Uint8Array | undefined) => new TextDecoder().decode(b);

let plan: PlannedPack;
let again: PlannedPack;
let letter: PlannedPack;
let pdfFile: string;
beforeAll(async () => {
  plan = await planPack(ws, '2026-11-30', { paper: 'a4', png: false });
  again = await planPack(ws, '2026-11-30', { paper: 'a4', png: false });
  letter = await planPack(ws, '2026-11-30', { paper: 'letter', png: true });
  pdfFile = path.join(temp, 'pack.pdf');
  writeFileSync(pdfFile, plan.files.get('pack.pdf')!);
});

describe('the pack holds every output of the contract', () => {
  it('index.md, index.html, pack.pdf, summary.json, record.json, manifest.json and one SVG chart per characteristic', () => {
    const files = [...plan.files.keys()].sort();
    expect(files).toEqual([...ids.map((id) => `charts/${id}.svg`).sort(), 'index.html', 'index.md', 'manifest.json', 'pack.pdf', 'record.json', 'summary.json'].sort());
  });
  it('manifest.json lists every other output with its SHA-256 (recomputed here with node:crypto)', () => {
    const manifest = JSON.parse(text(plan.files.get('manifest.json')));
    const listed = new Map(manifest.outputs.map((o: { path: string; sha256: string }) => [o.path, o.sha256]));
    expect(listed.size).toBe(plan.files.size - 1);
    for (const [p, bytes] of plan.files) {
      if (p === 'manifest.json') continue;
      expect(listed.get(p), p).toBe(createHash('sha256').update(bytes).digest('hex'));
    }
    expect(manifest.inputs.map((i: { path: string }) => i.path)).toEqual(expect.arrayContaining(['review.yaml', 'ledger.csv', 'data/fill-volume.csv']));
  });
  it('building twice gives byte-identical pack.pdf, index.html, index.md and summary.json', () => {
    for (const f of ['pack.pdf', 'index.html', 'index.md', 'summary.json', 'manifest.json', 'charts/cap-torque.svg']) {
      expect(Buffer.from(again.files.get(f)!).equals(Buffer.from(plan.files.get(f)!)), f).toBe(true);
    }
  });
  it('--png adds a PNG beside every SVG', () => {
    for (const id of ids) expect(letter.files.get(`charts/${id}.png`)?.subarray(1, 4)).toEqual(new TextEncoder().encode('PNG'));
  });
});

describe('index.html', () => {
  let tree: HastRoot;
  const elements: Element[] = [];
  beforeAll(() => {
    tree = fromHtml(text(plan.files.get('index.html')));
    visit(tree, 'element', (e: Element) => void elements.push(e));
  });
  const byTag = (t: string) => elements.filter((e) => e.tagName === t);
  it('has a section for every characteristic, in review.yaml order, between the overview and the method', () => {
    const h2 = byTag('h2').map((h) => String(h.properties.id));
    const sections = h2.filter((id) => id.startsWith('c-'));
    expect(sections).toEqual(ids.map((id) => `c-${id}`));
    expect(h2.slice(0, 3)).toEqual(['contents', 'decisions-needed', 'overview']);
    expect(h2.slice(-2)).toEqual(['cautions', 'method']);
  });
  it('opens with a contents list linking to every section', () => {
    const h2 = byTag('h2').map((h) => String(h.properties.id)).filter((id) => id !== 'contents');
    const contents = byTag('a').map((a) => String(a.properties.href)).slice(0, h2.length);
    expect(contents).toEqual(h2.map((id) => `#${id}`));
  });
  it('has every chart inline as SVG with a title and description, and no <img>, <script>, <link> or frames', () => {
    const svgs = byTag('svg');
    expect(svgs).toHaveLength(ids.length);
    for (const s of svgs) {
      expect(s.children.filter((c) => c.type === 'element').map((c) => (c as Element).tagName).slice(0, 2)).toEqual(['title', 'desc']);
    }
    for (const t of ['img', 'script', 'link', 'iframe', 'object', 'embed', 'foreignObject']) expect(byTag(t), t).toHaveLength(0);
    // Chart text stays text: the limit labels are searchable.
    expect(byTag('text').length).toBeGreaterThan(ids.length * 20);
  });
  it('makes no external request: every href is a fragment, every url() a data URL, and a CSP forbids the rest', () => {
    for (const e of elements) {
      for (const [k, v] of Object.entries(e.properties)) {
        if (['href', 'src', 'xLinkHref', 'action', 'formAction', 'poster', 'data'].includes(k)) expect(String(v), `${e.tagName} ${k}`).toMatch(/^#/);
        expect(k.startsWith('on'), `${e.tagName} has an event handler ${k}`).toBe(false);
      }
    }
    const css = byTag('style').map((s) => (s.children[0] as { value: string }).value).join('\n');
    for (const m of css.matchAll(/url\(([^)]*)\)/g)) expect(m[1]!.startsWith('data:')).toBe(true);
    expect(css.match(/@font-face/g)).toHaveLength(2);
    const csp = byTag('meta').find((m) => m.properties.httpEquiv?.toString() === 'Content-Security-Policy');
    expect(String(csp?.properties.content)).toMatch(/default-src 'none'/);
    expect(String(csp?.properties.content)).not.toMatch(/script-src/);
  });
  it('has a print stylesheet', () => {
    expect(text(plan.files.get('index.html'))).toMatch(/@media print\{\s*@page\{size:A4/);
  });
});

describe('index.md', () => {
  let md: Root;
  beforeAll(() => {
    md = unified().use(remarkParse).use(remarkGfm).parse(text(plan.files.get('index.md')));
  });
  it('re-parses with remark into the same sections', () => {
    const h2: string[] = [];
    visit(md, 'heading', (h) => {
      if (h.depth === 2) h2.push(h.children.map((c) => ('value' in c ? c.value : '')).join(''));
    });
    expect(h2).toEqual(['Contents', 'Decisions needed', 'Overview', ...names, 'Cautions', 'Method']);
  });
  it('shows every chart as an image file that the pack contains', () => {
    const urls: string[] = [];
    visit(md, 'image', (i) => void urls.push(i.url));
    expect(urls).toEqual(ids.map((id) => `charts/${id}.svg`));
    for (const u of urls) expect(plan.files.has(u)).toBe(true);
  });
  it('carries no raw HTML', () => {
    let html = 0;
    visit(md, 'html', () => void html++);
    expect(html).toBe(0);
  });
});

describe('pack.pdf', () => {
  it('passes qpdf --check', () => {
    expect(execFileSync('qpdf', ['--check', pdfFile], { encoding: 'utf8' })).toMatch(/No syntax or stream encoding errors/);
  });
  it('has the title and subject as metadata, dated the build date, on A4 (or US Letter with --paper letter)', () => {
    const info = pdfinfo(pdfFile);
    expect(info.Title).toBe(ws.config.title);
    expect(info.Subject).toBe('Control-limit review, 2026-11-01 to 2026-11-30');
    expect(info.CreationDate).toMatch(/Nov 30 00:00:00 2026/);
    expect(info['Page size']).toMatch(/^595\.28 x 841\.89 pts \(A4\)/);
    const letterFile = path.join(temp, 'letter.pdf');
    writeFileSync(letterFile, letter.files.get('pack.pdf')!);
    expect(pdfinfo(letterFile)['Page size']).toMatch(/^612 x 792 pts \(letter\)/);
  });
  it('numbers its pages and has the same sections in the same order as the HTML, each starting a page', () => {
    // pdftotext ends each page with a form feed.
    const pages = pdftotext(pdfFile).split('\f').slice(0, -1);
    expect(pages.length).toBe(Number(pdfinfo(pdfFile).Pages));
    pages.forEach((p, k) => expect(p).toContain(`Page ${k + 1} of ${pages.length}`));
    const starts = pages.map((p) => p.trimStart().split('\n')[0]!.trim());
    expect(pages[0]!.replace(/\s+/g, ' ').trim().startsWith(ws.config.title)).toBe(true);
    const sections = ['Contents', 'Decisions needed', 'Overview', ...names, 'Cautions', 'Method'];
    expect(starts.filter((s) => sections.includes(s))).toEqual(sections);
    const all = pages.join('\n');
    for (const phrase of ['Ledger lines to append', 'Limits rest on', 'References', 'not a target']) expect(all.replace(/\s+/g, ' ')).toMatch(new RegExp(phrase, 'i'));
  });
  it('has a contents page whose entries link to their sections', () => {
    const bytes = plan.files.get('pack.pdf')!;
    const raw = Buffer.from(bytes).toString('latin1');
    const links = raw.match(/\/Subtype \/Link/g) ?? [];
    // One per contents entry (2 + 12 + 2) and more from the decisions and overview tables.
    expect(links.length).toBeGreaterThanOrEqual(16 + 12);
    expect(raw).toMatch(/\/Dest \[ \d+ 0 R \/XYZ null [\d.]+ null \]/);
    // Each contents line ends with the page its section starts on.
    const pages = pdftotext(pdfFile).split('\f');
    const entries = [...pdftotext(pdfFile, '-layout', '-f', '2', '-l', '2').matchAll(/^\s*(\S.*?)\s{2,}(\d+)\s*$/gm)].map((m) => [m[1]!, Number(m[2])] as const);
    expect(entries.map(([t]) => t)).toEqual(['Decisions needed', 'Overview', ...names, 'Cautions', 'Method']);
    for (const [title, page] of entries) expect(pages[page - 1]!.trimStart().startsWith(title), `${title} on page ${page}`).toBe(true);
    expect(streams(bytes).length).toBeGreaterThan(0);
  });
  it('draws charts as vectors: no image in the file', () => {
    expect(Buffer.from(plan.files.get('pack.pdf')!).toString('latin1')).not.toMatch(/\/Subtype \/Image/);
  });
});
