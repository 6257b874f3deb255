/// <reference lib="dom" />
/**
 * Hostile text: a workspace whose every user-provided string — title,
 * organisation, customer name, characteristic names, units, tags, point
 * labels, ledger reasons and names — carries one of the injection payloads
 * below. The pack is read back with tools outside plumbline: the HTML and
 * the standalone SVGs with a real HTML parser (parse5), the Markdown with
 * remark, the HTML in headless Chromium with listeners for script execution,
 * dialogs and network requests; the proposed ledger lines as CSV cells.
 */
import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { parse as parseCsv } from 'csv-parse/sync';
import type { Element } from 'hast';
import { fromHtml } from 'hast-util-from-html';
import remarkGfm from 'remark-gfm';
import remarkParse from 'remark-parse';
import { unified } from 'unified';
import { visit } from 'unist-util-visit';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type PlannedPack, planPack } from '../src/build.ts';
import { loadWorkspace } from '../src/workspace/load.ts';
import { selectByTag } from '../src/workspace/select.ts';
import { ledgerLine } from '../src/review/ledger-line.ts';
import { readLedger } from '../src/workspace/ledger-file.ts';
import { launchChromium } from './helpers/browser.ts';

export const PAYLOADS = [
  '<script>window.__pwned=1</script>',
  '<img src=x onerror="window.__pwned=2">',
  '<svg onload="window.__pwned=3"></svg>',
  '<svg><foreignObject><div>x</div></foreignObject></svg>',
  '<iframe src="https://example.invalid/frame"></iframe>',
  '<a href="javascript:window.__pwned=4">click</a>',
  '[click](javascript:window.__pwned=5)',
  '[remote](https://example.invalid/link)',
  '![pixel](https://example.invalid/pixel.png)',
  '<style>@import url(https://example.invalid/x.css)</style>',
  '<link rel=stylesheet href=https://example.invalid/y.css>',
  '"><script>window.__pwned=6</script>',
  "' onmouseover='window.__pwned=7",
  '</title><script>window.__pwned=8</script>',
  ']]><script>window.__pwned=9</script>',
  '<!-- x --><b>bold</b> **bold** _em_ `code`',
  '<meta http-equiv="refresh" content="0;url=https://example.invalid/">',
  '<base href="https://example.invalid/">',
  'javascript:window.__pwned=10',
  'data:text/html,<script>window.__pwned=11</script>',
  '=HYPERLINK("https://example.invalid","x")',
  "+CMD|' /C calc'!A0",
  '-2+3',
  '@SUM(A1:A2)',
  '{{title}} {{chart}} {{reasons}}',
  '&lt;already&gt; &amp; escaped',
];

const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-hostile-'));
const profile = mkdtempSync(path.join(tmpdir(), 'plumbline-hostile-chromium-'));
afterAll(() => {
  rmSync(temp, { recursive: true, force: true });
  rmSync(profile, { recursive: true, force: true });
});

const yamlString = (s: string) => JSON.stringify(s);
const csv = (s: string) => `"${s.replace(/"/g, '""')}"`;
const day = (i: number) => new Date(Date.UTC(2026, 10, 1 + i)).toISOString().slice(0, 10);

/** One characteristic per payload, labelled and described by payloads, with reviewed ledger rows quoting them. */
function writeWorkspace(ws: string) {
  mkdirSync(path.join(ws, 'data'), { recursive: true });
  const chars = PAYLOADS.slice(0, 6).map((p, k) => ({ id: `c${k}`, name: p, unit: PAYLOADS[(k + 6) % PAYLOADS.length]!, tag: PAYLOADS[(k + 12) % PAYLOADS.length]! }));
  const yaml = [
    `title: ${yamlString(PAYLOADS[13]!)}`,
    `organisation: ${yamlString(PAYLOADS[1]!)}`,
    `period: {from: ${day(0)}, to: ${day(40)}}`,
    `customers: {${yamlString('evil')}: ${yamlString(PAYLOADS[0]!)}}`,
    'characteristics:',
    ...chars.flatMap((c) => [
      `  - id: ${c.id}`,
      `    name: ${yamlString(c.name)}`,
      '    chart: individuals',
      `    data: data/${c.id}.csv`,
      `    unit: ${yamlString(c.unit)}`,
      '    better: target',
      '    safety: true',
      `    tags: [evil, ${yamlString(c.tag)}]`,
    ]),
  ].join('\n');
  writeFileSync(path.join(ws, 'review.yaml'), `${yaml}\n`);
  // Every payload is a point label; the values zig-zag, with one spike to be reviewed.
  const rows = PAYLOADS.map((p, i) => `${csv(p)},${day(i)},${10 + (i % 2 ? 0.4 : -0.4) + (i === 9 ? 6 : 0)}`);
  for (const c of chars) writeFileSync(path.join(ws, 'data', `${c.id}.csv`), `label,date,value\n${rows.join('\n')}\n`);
  // Reasons take payloads 20–25 and names 18–23, so with the names, units and tags every payload is shown somewhere.
  const ledger = chars.map((c, k) => `${day(30)},${c.id},reviewed,${csv(PAYLOADS[9]!)},${csv(PAYLOADS[k + 20]!)},${csv(PAYLOADS[k + 18]!)}`);
  writeFileSync(path.join(ws, 'ledger.csv'), `date,characteristic,action,point,reason,by\n${ledger.join('\n')}\n`);
}

let plan: PlannedPack;
let customer: PlannedPack;
const text = (b: Uint8Array | undefined) => new TextDecoder().decode(b);

beforeAll(async () => {
  const ws = path.join(temp, 'ws');
  writeWorkspace(ws);
  const loaded = loadWorkspace(ws);
  if (!loaded.ok) throw new Error(loaded.diagnostics.map((d) => d.message).join('; '));
  plan = await planPack(loaded.workspace, day(40));
  const sel = selectByTag(loaded.workspace, 'evil')!;
  customer = await planPack(sel.workspace, day(40), { paper: 'a4', png: false, audience: { tag: 'evil', name: sel.name } });
});

function elementsOf(html: string, space: 'html' | 'svg' = 'html'): Element[] {
  const els: Element[] = [];
  visit(fromHtml(html, space === 'svg' ? { fragment: true, space: 'svg' } : {}), 'element', (e: Element) => void els.push(e));
  return els;
}

function expectInert(els: Element[], where: string) {
  for (const tag of ['script', 'img', 'iframe', 'object', 'embed', 'foreignObject', 'link', 'base', 'style']) {
    // The page's own stylesheet is the one <style> allowed, in <head>.
    const found = els.filter((e) => e.tagName === tag);
    if (tag === 'style') expect(found.length, `${where}: <style>`).toBeLessThanOrEqual(1);
    else expect(found, `${where}: <${tag}>`).toHaveLength(0);
  }
  const metas = els.filter((e) => e.tagName === 'meta' && e.properties.httpEquiv);
  for (const m of metas) expect(String(m.properties.httpEquiv), where).toMatch(/content-security-policy/i);
  for (const e of els)
    for (const [k, v] of Object.entries(e.properties)) {
      expect(k.toLowerCase().startsWith('on'), `${where}: ${e.tagName}.${k}`).toBe(false);
      // Namespace declarations name a URI; they load nothing.
      if (k.startsWith('xmlns')) continue;
      expect(String(v), `${where}: ${e.tagName}.${k}`).not.toMatch(/^\s*(javascript|data:text\/html|https?:)/i);
    }
}

describe('every user-provided string is inert text in every output', () => {
  it(`uses ${PAYLOADS.length} payloads (at least 20)`, () => expect(PAYLOADS.length).toBeGreaterThanOrEqual(20));

  it('index.html (full and customer pack): no element, attribute or link a payload could have made; the payloads read as text', () => {
    for (const [name, p] of [['full', plan], ['customer', customer]] as const) {
      const html = text(p.files.get('index.html'));
      const els = elementsOf(html);
      expectInert(els, name);
      for (const a of els.filter((e) => e.tagName === 'a')) expect(String(a.properties.href), name).toMatch(/^#/);
      const body: string[] = [];
      visit(fromHtml(html), 'text', (t: { value: string }) => void body.push(t.value));
      const all = body.join('\n');
      expect(PAYLOADS.filter((pl) => !all.includes(pl)), name).toEqual([]);
    }
  });

  it('every standalone chart SVG: nothing active, and the labels appear only as escaped title and description', () => {
    const svgs = [...plan.files].filter(([f]) => f.endsWith('.svg'));
    expect(svgs.length).toBe(6);
    for (const [f, bytes] of svgs) {
      const svg = text(bytes);
      expectInert(elementsOf(svg, 'svg'), f);
      // Raw check on tags only: escaped payload text may read "onerror=" in a title.
      expect(svg).not.toMatch(/<script|<foreignObject|<[a-zA-Z][^>]*\son\w+\s*=/i);
    }
  });

  it('index.md re-parsed: no HTML nodes, no images, no links but the pack’s own, every payload as text', () => {
    const md = unified().use(remarkParse).use(remarkGfm).parse(text(plan.files.get('index.md')));
    let html = 0;
    const urls: string[] = [];
    visit(md, 'html', () => void html++);
    visit(md, 'link', (l: { url: string }) => void urls.push(l.url));
    visit(md, 'image', (i: { url: string }) => void urls.push(i.url));
    expect(html).toBe(0);
    // Images are the chart files of the pack itself.
    expect(urls.filter((u) => !u.startsWith('#') && !/^charts\/c\d\.svg$/.test(u))).toEqual([]);
    const texts: string[] = [];
    visit(md, 'text', (n: { value: string }) => void texts.push(n.value));
    visit(md, 'inlineCode', (n: { value: string }) => void texts.push(n.value));
    // Link-like text carries a zero-width space in index.md so no renderer autolinks it; it reads the same.
    const joined = texts.join('\n').replace(/\u200b/g, '');
    expect(PAYLOADS.filter((p) => !p.includes('`') && !joined.includes(p))).toEqual([]);
  });

  it('template placeholders in data are not expanded', () => {
    expect(text(plan.files.get('index.md'))).toContain('{{title}} {{chart}} {{reasons}}');
  });

  it('a guarded ledger field reads back as the text it was written from, for every payload', () => {
    for (const p of PAYLOADS) {
      const line = ledgerLine({ date: '2026-01-01', characteristic: 'c0', action: 'note', point: p, reason: p, by: p });
      const read = readLedger(`date,characteristic,action,point,reason,by\n${line}\n`, new Set(['c0']));
      expect(read.diagnostics, p).toEqual([]);
      expect(read.entries[0], p).toMatchObject({ point: p, reason: p, by: p });
    }
  });

  it('proposed ledger lines guard formula prefixes (= + - @) so a spreadsheet shows them as text', () => {
    const summary = JSON.parse(text(plan.files.get('summary.json')));
    const lines: string[] = summary.characteristics.flatMap((c: { recommendation: { ledger: string[] } }) => c.recommendation.ledger);
    expect(lines.length).toBeGreaterThan(0);
    for (const line of lines) {
      const cells = (parseCsv(line) as string[][])[0]!;
      for (const cell of cells) expect(cell, line).not.toMatch(/^[=+\-@\t\r]/);
    }
  });
});

describe('the HTML pack in headless Chromium', () => {
  it('runs no script, opens no dialog and makes no request but the page itself', async () => {
    const file = path.join(temp, 'index.html');
    writeFileSync(file, plan.files.get('index.html')!);
    const url = pathToFileURL(file).href;
    const context = await launchChromium(profile);
    try {
      const page = await context.newPage();
      const requests: string[] = [];
      const dialogs: string[] = [];
      page.on('request', (r) => requests.push(r.url()));
      page.on('dialog', (d) => {
        dialogs.push(d.message());
        void d.dismiss();
      });
      await page.goto(url, { waitUntil: 'load' });
      // Hover and click every element a payload might have armed.
      for (const sel of ['a', 'svg', 'td', 'li']) {
        const loc = page.locator(sel);
        const n = Math.min(await loc.count(), 30);
        for (let i = 0; i < n; i++) await loc.nth(i).hover({ timeout: 2000 }).catch(() => undefined);
      }
      await page.waitForTimeout(300);
      expect(await page.evaluate(() => (window as unknown as { __pwned?: number }).__pwned)).toBeUndefined();
      expect(dialogs).toEqual([]);
      expect(requests.filter((u) => u !== url && !u.startsWith('data:'))).toEqual([]);
      expect(page.url()).toBe(url);
      await page.close();
    } finally {
      await context.close();
    }
  });
});
