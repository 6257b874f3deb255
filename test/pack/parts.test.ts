/**
 * The pack in parts (src/pack/parts.ts): index.md and index.html written
 * part by part, some parts taken as an earlier build wrote them, must be
 * the bytes of the whole tree written at once (remark-stringify's and
 * remark-rehype's own conversion of the whole document), on seeded random
 * trees of headings, paragraphs, lists, tables and code, and on the demo.
 */
import fc from 'fast-check';
import type { Root, RootContent } from 'mdast';
import { describe, expect, it } from 'vitest';
import { toHtml, toHtmlByParts } from '../../src/pack/html.ts';
import { toMarkdown, toMarkdownByParts } from '../../src/pack/markdown.ts';
import { splitParts } from '../../src/pack/parts.ts';

const word = fc.constantFrom('alpha', 'beta 2', '*x*', '1.', '- y', 'a|b', '#c', 'ﬁne');
const inline = fc.array(word, { minLength: 1, maxLength: 3 }).map((ws) => [{ type: 'text' as const, value: ws.join(' ') }]);
const block: fc.Arbitrary<RootContent> = fc.oneof(
  { weight: 2, arbitrary: fc.tuple(fc.integer({ min: 1, max: 3 }), inline).map(([depth, children]): RootContent => ({ type: 'heading', depth: depth as 1 | 2 | 3, children })) },
  { weight: 3, arbitrary: inline.map((children): RootContent => ({ type: 'paragraph', children })) },
  fc.array(inline, { minLength: 1, maxLength: 3 }).map((items): RootContent => ({
    type: 'list',
    ordered: false,
    spread: false,
    children: items.map((children) => ({ type: 'listItem', spread: false, children: [{ type: 'paragraph', children }] })),
  })),
  fc.tuple(inline, inline).map(([a, b]): RootContent => ({ type: 'table', align: [null, 'right'], children: [{ type: 'tableRow', children: [{ type: 'tableCell', children: a }, { type: 'tableCell', children: b }] }] })),
  word.map((value): RootContent => ({ type: 'code', lang: 'csv', value })),
  fc.constant<RootContent>({ type: 'html', value: '<b>dropped</b>' }),
  fc.constant<RootContent>({ type: 'thematicBreak' }),
);

// Strict: bytes that are not UTF-8 fail the test rather than decode to replacement characters.
const utf8 = new TextDecoder('utf-8', { fatal: true });

describe('index.md and index.html by parts', () => {
  it('are the whole document’s bytes, whichever parts come from an earlier build', () => {
    fc.assert(
      fc.property(fc.array(block, { minLength: 1, maxLength: 12 }), fc.array(fc.boolean(), { minLength: 12, maxLength: 12 }), (children, reuse) => {
        const tree: Root = { type: 'root', children };
        const parts = splitParts(tree);
        expect(parts.flat()).toEqual(children);
        // An earlier build's texts, for the parts `reuse` picks.
        const earlierMd = new Map<number, Uint8Array>();
        const earlierHtml = new Map<number, Uint8Array>();
        toMarkdownByParts(parts, () => undefined, (i, md) => earlierMd.set(i, md));
        // Font bytes only go into the page's @font-face; a byte each keeps 400 pages cheap.
        const input = { tree, title: 't', scenes: new Map(), fonts: { regular: new Uint8Array([1]), semibold: new Uint8Array([2]) } };
        toHtmlByParts(input, { parts, known: () => undefined, fresh: (i, html) => earlierHtml.set(i, html) });
        const fresh: number[] = [];
        const md = toMarkdownByParts(parts, (i) => (reuse[i] ? earlierMd.get(i) : undefined), (i) => fresh.push(i));
        expect(utf8.decode(md)).toBe(toMarkdown(tree));
        expect(fresh).toEqual(parts.map((_, i) => i).filter((i) => !reuse[i]));
        const html = toHtmlByParts(input, { parts, known: (i) => (reuse[i] ? earlierHtml.get(i) : undefined), fresh: () => {} });
        expect(utf8.decode(html)).toBe(toHtml(input, { whole: true }));
      }),
      { numRuns: 400, seed: 20261202 },
    );
  });
});
