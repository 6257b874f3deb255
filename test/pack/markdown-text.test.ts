/**
 * index.md's text handler skips remark's escaping for text that needs none.
 * Checked against the stock route (mdast-util-to-markdown's own text
 * handler, `state.safe(value, info)`, after the same defanging) on seeded
 * random trees: paragraphs, headings, lists and GFM tables of text, strong,
 * emphasis, inline code, links and breaks, with every ASCII punctuation
 * character, spaces at either end, line endings, tabs and backslashes.
 */
import fc from 'fast-check';
import type { PhrasingContent, Root, RootContent } from 'mdast';
import remarkGfm from 'remark-gfm';
import remarkStringify from 'remark-stringify';
import { unified } from 'unified';
import { describe, expect, it } from 'vitest';
import { defang, toMarkdown } from '../../src/pack/markdown.ts';

const stock = unified()
  .use(remarkGfm)
  .use(remarkStringify, { bullet: '-', fences: true, rule: '-', handlers: { text: (node, _parent, state, info) => state.safe(defang(node.value), info) } });

const punctuation = '!"#$%&\'()*+,-./:;<=>?@[\\]^_`{|}~';
const char = fc.constantFrom(...'abcXYZ019 ', ...punctuation, '\n', '\t', 'é', 'www.', 'http:', '1.', '- ');
const words = fc.array(char, { minLength: 1, maxLength: 12 }).map((cs) => cs.join(''));
const phrasing: fc.Arbitrary<PhrasingContent> = fc.oneof(
  { weight: 6, arbitrary: words.map((value): PhrasingContent => ({ type: 'text', value })) },
  words.map((value): PhrasingContent => ({ type: 'strong', children: [{ type: 'text', value }] })),
  words.map((value): PhrasingContent => ({ type: 'emphasis', children: [{ type: 'text', value }] })),
  words.map((value): PhrasingContent => ({ type: 'inlineCode', value })),
  words.map((value): PhrasingContent => ({ type: 'link', url: '#a', children: [{ type: 'text', value }] })),
  fc.constant<PhrasingContent>({ type: 'break' }),
);
const inline = fc.array(phrasing, { minLength: 1, maxLength: 6 });
const block: fc.Arbitrary<RootContent> = fc.oneof(
  inline.map((children): RootContent => ({ type: 'paragraph', children })),
  fc.tuple(fc.integer({ min: 1, max: 3 }), inline).map(([depth, children]): RootContent => ({ type: 'heading', depth: depth as 1 | 2 | 3, children })),
  fc.array(inline, { minLength: 1, maxLength: 3 }).map((items): RootContent => ({
    type: 'list',
    ordered: false,
    spread: false,
    children: items.map((children) => ({ type: 'listItem', spread: false, children: [{ type: 'paragraph', children }] })),
  })),
  fc.array(fc.tuple(inline, inline), { minLength: 1, maxLength: 3 }).map((rows): RootContent => ({
    type: 'table',
    align: [null, 'right'],
    children: rows.map(([a, b]) => ({ type: 'tableRow', children: [{ type: 'tableCell', children: a }, { type: 'tableCell', children: b }] })),
  })),
);

describe('index.md text', () => {
  it('is written exactly as remark’s own text handler writes it, for any text in any of the pack’s constructs', () => {
    fc.assert(
      fc.property(fc.array(block, { minLength: 1, maxLength: 5 }), (children) => {
        const tree: Root = { type: 'root', children };
        expect(toMarkdown(tree)).toBe(stock.stringify(tree));
      }),
      { numRuns: 3000, seed: 20261202 },
    );
  });
});
