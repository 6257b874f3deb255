/**
 * The pack tree: templates and their placeholders, the cautions section,
 * hostile text from the data, and the root-phrasing rule of
 * mdast-util-to-markdown (phrasing at the root runs the document together).
 */
import { cpSync, mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Element } from 'hast';
import { fromHtml } from 'hast-util-from-html';
import remarkGfm from 'remark-gfm';
import remarkParse from 'remark-parse';
import { unified } from 'unified';
import { visit } from 'unist-util-visit';
import { afterAll, describe, expect, it } from 'vitest';
import type { Paragraph, Root } from 'mdast';
import type { Assessed, Assessment } from '../../src/analyse.ts';
import { EARLIER_SIGNAL_ROWS, buildPackTree } from '../../src/pack/content.ts';
import { packItems } from '../../src/pack/brief.ts';
import { toHtml } from '../../src/pack/html.ts';
import { toMarkdown } from '../../src/pack/markdown.ts';
import type { Templates } from '../../src/pack/template.ts';
import type { ReviewConfig } from '../../src/model.ts';
import { readTemplates } from '../../src/workspace/templates.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';
import { planSummary } from '../../src/assess.ts';
import { fonts, sceneOf } from '../helpers/charts.ts';
import { assess, isoDay, ledgerCsv, pointsCsv } from '../helpers/in-memory.ts';

const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-content-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));
const toolTemplates = readTemplates(path.join(temp, 'none')).templates;

function tree(assessments: Assessment[], templates: Templates = toolTemplates, config: Partial<ReviewConfig> = {}) {
  const review: ReviewConfig = {
    title: 'Review',
    organisation: 'Org',
    period: { from: '1900-01-01', to: '2999-12-31' },
    rules: 'western-electric',
    minPoints: 5,
    freezeAfter: 20,
    customers: {},
    characteristics: assessments.map((a) => a.characteristic),
    ...config,
  };
  return buildPackTree({
    config: review,
    characteristics: packItems(assessments, review),
    diagnostics: [],
    asOf: '2020-02-01',
    fingerprint: 'f'.repeat(64),
    tool: { name: 'plumbline', version: '0.0.0' },
    templates,
    chartFile: (id) => `charts/${id}.svg`,
  });
}

const stable = (over: Partial<Assessment['characteristic']> = {}): Assessment => {
  const a = assess({ chart: 'individuals', csv: pointsCsv('date,value', Array.from({ length: 10 }, (_, i) => [10 + (i % 2 ? 0.3 : -0.3)])) });
  return { ...a, characteristic: { ...a.characteristic, ...over } } as Assessment;
};

describe('the signals table of a long history', () => {
  // 400 daily points alternating 10 ± 0.3, with a spike to 30 every 5th point from the 30th: far beyond the
  // limits of the first 20 (mean moving range 0.6, σ = 0.6/1.128 ≈ 0.53, UCL ≈ 11.6), each spike one
  // beyond-limit signal of its own on the values chart (counted by construction: 75 spikes, 71 before the period).
  const n = 400;
  const spikes = Array.from({ length: n }, (_, i) => i).filter((i) => i >= 30 && i % 5 === 0);
  const values = Array.from({ length: n }, (_, i) => (spikes.includes(i) ? 30 : 10 + (i % 2 ? 0.3 : -0.3)));
  const period = { from: isoDay(380), to: isoDay(n - 1) };
  // Limits frozen on the first 20 points, so the spikes do not widen them.
  const ledger = ledgerCsv([`${isoDay(21)},x,freeze,20,Trial limits stable over 20 points,Q. Engineer`]);
  const a = assess({ chart: 'individuals', csv: pointsCsv('date,value', values.map((v) => [v])), ledger, period });
  const md = toMarkdown(tree([a], toolTemplates, { period }).tree);
  const rows = md.split('\n').filter((l) => l.startsWith('| One point beyond a control limit') && l.includes('individual value'));

  it('lists every signal in the period and only the latest earlier ones, and counts the rest by rule', () => {
    if (a.status !== 'assessed') throw new Error('not assessed');
    const beyond = a.location.signals.filter((s) => s.rule === 'beyond-limits');
    expect(beyond.map((s) => s.flagged[0])).toEqual(spikes);
    const inPeriod = (i: number) => i >= 380;
    const all = [...a.location.signals, ...(a.dispersion?.signals ?? [])];
    const earlier = all.filter((s) => !s.flagged.some(inPeriod));
    const listedEarlier = Math.min(EARLIER_SIGNAL_ROWS, earlier.length);
    const tableRows = md.split('\n').filter((l) => /^\| [A-Z0-9].* \| (yes|no) +\| (yes|no) +\|$/.test(l));
    expect(tableRows).toHaveLength(all.length - earlier.length + listedEarlier);
    // The beyond-limit rows: the four spikes in the period (380, 385, 390, 395) and the latest earlier ones.
    expect(rows.at(-1)).toContain(`| ${spikes.at(-1)! + 1} (${isoDay(spikes.at(-1)!)})`);
    const left = earlier.length - listedEarlier;
    expect(left).toBeGreaterThan(0);
    expect(md).toContain(`Not listed: ${left} earlier signals, before the latest ${EARLIER_SIGNAL_ROWS} (`);
    const counted = /before the latest \d+ \(([^)]*)\)/.exec(md)![1]!.split(', ').map((p) => Number(p.split(': ')[1]));
    expect(counted.reduce((x, y) => x + y, 0)).toBe(left);
  });
});

describe('the tree', () => {
  it('never puts phrasing content at the root (it would run the Markdown together)', () => {
    const { tree: t } = tree([stable(), stable({ id: 'y', safety: true })]);
    const phrasing = ['text', 'strong', 'emphasis', 'link', 'image', 'inlineCode', 'break'];
    expect(t.children.filter((n) => phrasing.includes(n.type))).toEqual([]);
  });
  it('brings the cautions section only when a characteristic is safety-related or tagged as an incident count', () => {
    const heads = (a: Assessment[]) => tree(a).tree.children.filter((n) => n.type === 'heading' && n.depth === 2).map((n) => toMarkdown({ type: 'root', children: [n] }).trim());
    expect(heads([stable()])).not.toContain('## Cautions');
    expect(heads([stable({ safety: true })])).toContain('## Cautions');
    expect(heads([stable({ tags: ['incidents'] })])).toContain('## Cautions');
    const md = toMarkdown(tree([stable({ safety: true, name: 'Lost-time injuries' })]).tree);
    for (const phrase of ['Not a target, not for blame', 'Control limits are not specification or regulatory limits', 'qualified safety professionals decide', '[Lost-time injuries](#c-x)']) {
      expect(md).toContain(phrase);
    }
  });
});

describe('templates', () => {
  it('a workspace template replaces the tool’s, and its unknown placeholders are reported with file and line', () => {
    const ws = path.join(temp, 'ws');
    cpSync(path.join(import.meta.dirname, '../fixtures/engine'), ws, { recursive: true });
    mkdirSync(path.join(ws, 'templates'));
    writeFileSync(path.join(ws, 'templates/characteristic.md'), '## {{name}} ({{id}})\n\nOur own words.\n\n{{chart}}\n\n{{nonsense}}\n\nAction: {{action}} {{typo}}\n');
    const loaded = loadWorkspace(ws);
    if (!loaded.ok) throw new Error('no load');
    expect(loaded.workspace.inputs.has('templates/characteristic.md')).toBe(true);
    const plan = planSummary(loaded.workspace, '2026-11-30');
    const built = tree(plan.assessments as Assessment[], loaded.workspace.templates, loaded.workspace.config);
    const md = toMarkdown(built.tree);
    expect(md).toContain('## Fill volume (fill-trial)');
    expect(md).toContain('Our own words.');
    expect(md).toContain('Action: freeze the trial limits {{typo}}');
    const unknown = built.diagnostics.filter((d) => d.ruleId === 'template/unknown-placeholder');
    // Each of the ten characteristics reports both, at their lines in the template.
    expect(new Set(unknown.map((d) => `${d.file}:${d.line}:${d.message.split(' ')[0]}`))).toEqual(
      new Set(['templates/characteristic.md:7:{{nonsense}}', 'templates/characteristic.md:9:{{typo}}']),
    );
  });
  it('a placeholder used twice puts two copies in the tree, not one node twice (the writers annotate nodes)', () => {
    const templates = { ...toolTemplates, characteristic: { file: 'templates/characteristic.md', text: '## {{name}}\n\n{{reasons}}\n\n### Again\n\n{{reasons}}\n' } };
    const nodes = tree([stable()], templates).tree.children;
    const again = nodes.findIndex((n) => n.type === 'heading' && n.depth === 3 && toMarkdown({ type: 'root', children: [n] }).trim() === '### Again');
    const first = nodes[again - 1]!;
    const second = nodes[again + 1]!;
    expect(first.type).toBe('list');
    expect(second).toEqual(first);
    expect(second).not.toBe(first);
  });
});

describe('reference links in a workspace template', () => {
  const ws = path.join(temp, 'ws-references');
  cpSync(path.join(import.meta.dirname, '../fixtures/engine'), ws, { recursive: true });
  mkdirSync(path.join(ws, 'templates'));
  writeFileSync(
    path.join(ws, 'templates/method.md'),
    '## Method\n\nSee [the site][x], [home][y], [back][top], a note[^1] and ![logo][z].\n\n[x]: javascript:alert(1)\n[y]: https://example.com\n[top]: #contents\n[z]: https://example.com/logo.png\n[^1]: A footnote.\n',
  );
  const loaded = loadWorkspace(ws);
  if (!loaded.ok) throw new Error('no load');
  const plan = planSummary(loaded.workspace, '2026-11-30');
  const built = tree(plan.assessments as Assessment[], loaded.workspace.templates, loaded.workspace.config).tree;

  it('HTML: a reference link gets the inline link’s treatment — only links within the pack stay links; no image loads', () => {
    // They once reached the page as <a href="javascript:alert(1)"> and <img src="https://…">.
    const html = toHtml({ tree: built, title: 'x', scenes: new Map(), fonts });
    const els: Element[] = [];
    visit(fromHtml(html), 'element', (e: Element) => void els.push(e));
    const hrefs = els.filter((e) => e.tagName === 'a').map((e) => String(e.properties.href));
    expect(hrefs.filter((h) => !h.startsWith('#'))).toEqual([]);
    expect(hrefs).toContain('#contents');
    expect(els.filter((e) => e.tagName === 'img')).toEqual([]);
    expect(html).toContain('See <span>the site</span>, <span>home</span>, <a href="#contents">back</a>');
    // The footnote still works: its reference and its list, linked both ways.
    expect(html).toContain('href="#user-content-fn-1"');
    expect(html).toContain('id="user-content-fn-1"');
  });
  it('Markdown: the references are written inline; no definition is left over', () => {
    const md = toMarkdown(built);
    expect(md).toContain('[back](#contents)');
    expect(md).not.toMatch(/^\[x\]:/m);
  });
});

describe('index.html, written one top-level block at a time', () => {
  // The reference is remark-rehype and rehype-stringify converting the whole tree as one document.
  const loaded = loadWorkspace(path.join(import.meta.dirname, '../../data/demo'));
  if (!loaded.ok) throw new Error('no load');
  const plan = planSummary(loaded.workspace, loaded.workspace.config.period.to);
  const assessed = plan.assessments.filter((a): a is Assessed => a.status === 'assessed');
  const scenes = new Map(assessed.map((a) => [a.characteristic.id, sceneOf(a, loaded.workspace.config.period)]));
  const demo = tree(plan.assessments as Assessment[], loaded.workspace.templates, loaded.workspace.config).tree;
  const same = (t: Root) => {
    const input = { tree: t, title: 'Pack', scenes, fonts };
    expect(toHtml(input)).toBe(toHtml(input, { whole: true }));
  };
  it('the demo pack (19 charts, tables, lists, cautions) is the same bytes as the whole document converted at once', () => {
    expect(scenes.size).toBeGreaterThan(10);
    same(demo);
  });
  it('blocks that make nothing (raw HTML, dropped) leave no blank lines behind; a lone block, an empty tree', () => {
    const p = (value: string): Paragraph => ({ type: 'paragraph', children: [{ type: 'text', value }] });
    const withRaw: Root = { type: 'root', children: [p('a'), { type: 'html', value: '<b>x</b>' }, { type: 'html', value: '<i>y</i>' }, p('b'), { type: 'thematicBreak' }, { type: 'blockquote', children: [p('c')] }, { type: 'html', value: '<u>' }] };
    same(withRaw);
    // Dropped, not written: the page writes raw nodes as they are (the charts' markup), so raw HTML
    // from a template must never become one.
    const page = toHtml({ tree: withRaw, title: 'Pack', scenes, fonts });
    for (const raw of ['<b>', '<i>', '<u>']) expect(page).not.toContain(raw);
    same({ type: 'root', children: [p('only')] });
    same({ type: 'root', children: [] });
  });
});

describe('an unreadable workspace template', () => {
  it('stops the build before anything is written, naming the file', () => {
    const ws = path.join(temp, 'ws-bad-template');
    cpSync(path.join(import.meta.dirname, '../fixtures/engine'), ws, { recursive: true });
    mkdirSync(path.join(ws, 'templates/method.md'), { recursive: true });
    const loaded = loadWorkspace(ws);
    expect(loaded.ok).toBe(false);
    if (loaded.ok) return;
    expect(loaded.diagnostics.map((d) => [d.file, d.ruleId])).toEqual([['templates/method.md', 'template/unreadable']]);
    expect(loaded.diagnostics[0]!.message).toMatch(/it is a folder/);
  });
});

describe('text from the data is text in every output', () => {
  const payloads = [
    '<script>alert(1)</script>',
    '<img src=x onerror=alert(1)>',
    '[click](javascript:alert(1))',
    '<svg><foreignObject><div>x</div></foreignObject></svg>',
    '**bold** _em_ `code` # heading',
    'bell\u0007 nul\u0000 escape\u001b[31m',
  ];
  const a = assess({
    chart: 'individuals',
    csv: pointsCsv('date,value', Array.from({ length: 12 }, (_, i) => [10 + (i % 2 ? 0.3 : -0.3) + (i === 9 ? 5 : 0)])),
    ledger: ledgerCsv([`${isoDay(20)},x,reviewed,10,"${payloads[0]} ${payloads[2]}",<b>me</b>`]),
  });
  const hostile = { ...a, characteristic: { ...a.characteristic, name: payloads.join(' '), unit: payloads[1]! } } as Assessment;
  const t = tree([hostile]).tree;
  it('HTML: no script, handler, image, foreign object or javascript: link appears; the payload reads as text', () => {
    const html = toHtml({ tree: t, title: payloads[0]!, scenes: new Map(), fonts });
    const els: Element[] = [];
    visit(fromHtml(html), 'element', (e: Element) => void els.push(e));
    for (const tag of ['script', 'img', 'foreignObject', 'iframe']) expect(els.filter((e) => e.tagName === tag), tag).toHaveLength(0);
    for (const e of els) for (const [k, v] of Object.entries(e.properties)) {
      expect(k.startsWith('on'), `${e.tagName}.${k}`).toBe(false);
      expect(String(v)).not.toMatch(/javascript:/i);
    }
    expect(html).toContain('&#x3C;script>alert(1)&#x3C;/script>');
  });
  it('control characters reach no output (XML forbids them; they mean nothing in a label)', () => {
    const html = toHtml({ tree: t, title: 'x', scenes: new Map(), fonts });
    const md = toMarkdown(t);
    for (const out of [html, md]) expect(out.replace(/[\n]/g, '')).not.toMatch(/[\u0000-\u001f\u007f]/);
    expect(html).toContain('bell nul escape[31m');
  });
  it('Markdown: re-parsed, the payloads are text — no HTML nodes and no links but the pack’s own', () => {
    const md = unified().use(remarkParse).use(remarkGfm).parse(toMarkdown(t));
    let html = 0;
    const urls: string[] = [];
    visit(md, 'html', () => void html++);
    visit(md, 'link', (l) => void urls.push(l.url));
    expect(html).toBe(0);
    expect(urls.every((u) => u.startsWith('#'))).toBe(true);
    const texts: string[] = [];
    visit(md, 'text', (n) => void texts.push(n.value));
    // index.md puts a zero-width space into link-like text (javascript: here) so no renderer autolinks it.
    const read = texts.join(' ').replace(/\u200b/g, '');
    expect(read).toContain('<script>alert(1)</script>');
    expect(read).toContain('[click](javascript:alert(1))');
    expect(texts.join(' ')).toContain('javascript\u200b:');
  });
});
