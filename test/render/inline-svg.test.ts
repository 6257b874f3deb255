/**
 * The HTML pack's inline SVG (src/render/svg-inline.ts) is written as markup
 * directly. Its bytes must be what hast-util-to-html (the serialiser
 * rehype-stringify uses) writes for the same chart as an element tree: that
 * tree is built here, element by element, and serialised by the library;
 * the markup must equal it on seeded scenes whose every string is hostile
 * (quotes, ampersands, angle brackets, control and astral characters, lone
 * surrogates). And parsed back by an HTML parser (hast-util-from-html,
 * parse5 underneath), the labels, title and ids must read as given.
 */
import fc from 'fast-check';
import type { Element, ElementContent, Root } from 'hast';
import { fromHtml } from 'hast-util-from-html';
import { toHtml } from 'hast-util-to-html';
import { describe, expect, it } from 'vitest';
import { compactPath, geom, printable } from '../../src/format.ts';
import { FONT_FAMILY } from '../../src/render/fonts.ts';
import type { Paint, Primitive, Scene } from '../../src/render/scene/types.ts';
import { inlineSvg } from '../../src/render/svg-inline.ts';

const el = (tagName: string, properties: Element['properties'], children: ElementContent[] = []): Element => ({ type: 'element', tagName, properties, children });

/** The chart as a hast tree, with hast's property names (className, ariaLabelledBy, fillOpacity…). */
function reference(scene: Scene, idBase: string): Root {
  const node = (p: Primitive): Element => {
    if (p.kind === 'rect') return el('rect', { x: geom(p.x), y: geom(p.y), width: geom(p.w), height: geom(p.h), fill: p.fill, ...(p.opacity !== undefined ? { fillOpacity: p.opacity } : {}) });
    if (p.kind === 'path') {
      return el('path', {
        d: compactPath(p.d),
        fill: p.fill ?? 'none',
        ...(p.stroke ? { stroke: p.stroke.paint, strokeWidth: p.stroke.width, ...(p.stroke.dash ? { strokeDasharray: p.stroke.dash.join(' ') } : {}) } : {}),
        ...(p.opacity !== undefined ? { opacity: p.opacity } : {}),
      });
    }
    return el(
      'text',
      { x: geom(p.x), y: geom(p.y), fontSize: p.size, ...(p.weight !== 400 ? { fontWeight: p.weight } : {}), ...(p.anchor !== 'start' ? { textAnchor: p.anchor } : {}), ...(p.fill !== '#1f1f1f' ? { fill: p.fill } : {}) },
      [{ type: 'text', value: p.text }],
    );
  };
  const svg = el(
    'svg',
    { xmlns: 'http://www.w3.org/2000/svg', viewBox: `0 0 ${scene.width} ${scene.height}`, width: scene.width, height: scene.height, role: 'img', ariaLabelledBy: `${idBase}-title ${idBase}-desc`, className: ['chart'], fontFamily: FONT_FAMILY, fill: '#1f1f1f' },
    [
      el('title', { id: `${idBase}-title` }, [{ type: 'text', value: printable(scene.title) }]),
      el('desc', { id: `${idBase}-desc` }, [{ type: 'text', value: printable(scene.desc) }]),
      el('rect', { x: 0, y: 0, width: scene.width, height: scene.height, fill: '#ffffff' }),
      ...scene.items.map(node),
    ],
  );
  // Inside a figure of an HTML page, as the pack has it.
  return { type: 'root', children: [el('figure', { className: ['chart'] }, [svg])] };
}

const hostile = fc.oneof(
  fc.string({ unit: 'binary', maxLength: 12 }),
  fc.constantFrom('<script>alert(1)</script>', '"><img src=x onerror=alert(1)>', "'&amp;&lt;", ']]>', 'a\u0000b\u0007c\u001fd', '\ud800 lone', 'x \udfff', '𝔘 ﬁne σ ≥', '&#x3C;'),
);
const paint = fc.constantFrom<Paint>('#1f1f1f', '#5c5c5c', '#0072b2', '#ffffff');
const coordinate = fc.double({ min: -1000, max: 1000, noNaN: true });
const primitive: fc.Arbitrary<Primitive> = fc.oneof(
  fc.record({ kind: fc.constant('rect' as const), x: coordinate, y: coordinate, w: coordinate, h: coordinate, fill: paint }, { requiredKeys: ['kind', 'x', 'y', 'w', 'h', 'fill'] }).chain((r) =>
    fc.option(fc.double({ min: 0, max: 1, noNaN: true }), { nil: undefined }).map((opacity) => (opacity === undefined ? r : { ...r, opacity })),
  ),
  fc
    .record({
      d: fc.array(fc.tuple(coordinate, coordinate), { minLength: 1, maxLength: 4 }).map((pts) => pts.map(([x, y], i) => `${i === 0 ? 'M' : 'L'}${geom(x)} ${geom(y)}`).join(' ')),
      fill: fc.option(paint, { nil: undefined }),
      stroke: fc.option(fc.record({ paint, width: fc.constantFrom(0.7, 1, 1.1, 2), dash: fc.option(fc.constantFrom([5, 3], [2, 2]), { nil: undefined }) }), { nil: undefined }),
      opacity: fc.option(fc.constantFrom(0.1, 0.5, 0.7), { nil: undefined }),
    })
    .map((r): Primitive => {
      const stroke = r.stroke ? { paint: r.stroke.paint, width: r.stroke.width, ...(r.stroke.dash ? { dash: r.stroke.dash } : {}) } : undefined;
      return { kind: 'path', d: r.d, ...(r.fill ? { fill: r.fill } : {}), ...(stroke ? { stroke } : {}), ...(r.opacity !== undefined ? { opacity: r.opacity } : {}) };
    }),
  fc
    .record({ x: coordinate, y: coordinate, text: hostile, size: fc.constantFrom(9, 10, 14), weight: fc.constantFrom(400 as const, 600 as const), anchor: fc.constantFrom('start' as const, 'middle' as const, 'end' as const), fill: paint })
    .map((r): Primitive => ({ kind: 'text', ...r, width: 10 })),
);
const scene: fc.Arbitrary<Scene> = fc
  .record({ width: fc.integer({ min: 1, max: 2000 }), height: fc.integer({ min: 1, max: 2000 }), title: hostile, desc: hostile, items: fc.array(primitive, { maxLength: 12 }) })
  .map((s) => s as unknown as Scene);

describe('inline SVG markup', () => {
  it('is what hast-util-to-html writes for the same chart as an element tree', () => {
    fc.assert(
      fc.property(scene, hostile, (s, idBase) => {
        expect(`<figure class="chart">${inlineSvg(s, idBase)}</figure>`).toBe(toHtml(reference(s, idBase)));
      }),
      { numRuns: 500, seed: 20261202 },
    );
  });

  it('reads back through an HTML parser as the labels, title and ids it was given', () => {
    // Text an HTML parser keeps as it is: no control characters (which it may drop or replace) and no lone surrogates.
    const plain = fc.string({ unit: 'grapheme', maxLength: 12 }).filter((t) => printable(t) === t && t.trim() === t && t !== '');
    fc.assert(
      fc.property(fc.array(plain, { minLength: 1, maxLength: 6 }), plain, plain, (labels, title, idBase) => {
        const items = labels.map((t, i): Primitive => ({ kind: 'text', x: i, y: i, text: t, size: 9, weight: 400, anchor: 'start', width: 1, fill: '#1f1f1f' }));
        const page = fromHtml(`<!doctype html><html><body><figure>${inlineSvg({ width: 10, height: 10, title, desc: 'd', items } as unknown as Scene, idBase)}</figure></body></html>`);
        const found: Element[] = [];
        const walk = (n: { children?: unknown[] }) => {
          for (const c of (n.children ?? []) as (Element | { type: string })[]) if (c.type === 'element') found.push(c as Element), walk(c as Element);
        };
        walk(page);
        const textOf = (e: Element) => e.children.map((c) => (c.type === 'text' ? c.value : '')).join('');
        expect(found.filter((e) => e.tagName === 'text').map(textOf)).toEqual(labels);
        const titleElement = found.find((e) => e.tagName === 'title')!;
        expect(textOf(titleElement)).toBe(title);
        expect(titleElement.properties.id).toBe(`${idBase}-title`);
        // A space-separated list: split where HTML sees white space (not at every JavaScript \s).
        expect(found.find((e) => e.tagName === 'svg')!.properties.ariaLabelledBy).toEqual([`${idBase}-title`, `${idBase}-desc`].flatMap((s) => s.split(/[ \t\n\f\r]+/)).filter((s) => s !== ''));
      }),
      { numRuns: 300, seed: 20261202 },
    );
  });
});
