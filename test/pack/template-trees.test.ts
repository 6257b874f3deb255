/**
 * The templates' syntax trees kept between builds (template.ts:
 * rememberParsed, templatesParsed): a tree kept by an earlier build is
 * used for the same text without parsing it again, and what a template
 * fills in is the same as from a tree parsed here. The reference for the
 * tree is remark itself (remark-parse with remark-gfm, the registry
 * libraries), run here apart from plumbline's own parser.
 */
import type { Root } from 'mdast';
import remarkGfm from 'remark-gfm';
import remarkParse from 'remark-parse';
import { unified } from 'unified';
import { deserialize, serialize } from 'node:v8';
import { describe, expect, it } from 'vitest';
import { fillTemplate, rememberParsed, templatesParsed as parsedOf } from '../../src/pack/template.ts';

const TEXT = '# Method\n\nLimits are frozen after {{freeze-after}} points.\n\n{{constants}}\n\n| a | b |\n| - | - |\n| 1 | 2 |\n';
const values = { blocks: { constants: [{ type: 'paragraph' as const, children: [{ type: 'text' as const, value: 'TABLE' }] }] }, strings: { 'freeze-after': '20' } };
const others = { file: 'other.md', text: 'Other.\n' };
/** templatesParsed of a set of templates whose method template is `text`. */
const templatesParsed = (text = TEXT) => parsedOf({ pack: others, characteristic: others, cautions: others, method: { file: 'method.md', text } });
/** Positions left out: what the writers read of a tree. */
const shape = (v: unknown): unknown => JSON.parse(JSON.stringify(v, (k, x) => (k === 'position' ? undefined : x)));

describe('templates\' trees kept between builds', () => {
  it('are what remark parses, and fill in alike when taken back', () => {
    const before = templatesParsed().fresh;
    const filled = fillTemplate({ file: 'method.md', text: TEXT }, values);
    const after = templatesParsed();
    expect(after.fresh).toBe(before + 1);
    const tree = after.trees.get(TEXT)!;
    // The tree kept is remark's own (this template has no reference links for plumbline to inline).
    const reference = unified().use(remarkParse).use(remarkGfm);
    expect(shape(tree)).toEqual(shape(reference.runSync(reference.parse(TEXT))));
    // The placeholders filled: the block in place of its paragraph, the string in its text.
    expect(shape(filled.nodes[1])).toEqual({ type: 'paragraph', children: [{ type: 'text', value: 'Limits are frozen after 20 points.' }] });
    expect(shape(filled.nodes[2])).toEqual(values.blocks.constants[0]);
    // Filling again neither parses again nor changes the kept tree.
    fillTemplate({ file: 'method.md', text: TEXT }, values);
    expect(templatesParsed().fresh).toBe(after.fresh);
    expect(shape(templatesParsed().trees.get(TEXT))).toEqual(shape(tree));
    // Only the templates given are kept: "Other." was never filled in here.
    expect([...templatesParsed().trees.keys()]).toEqual([TEXT]);
  });

  it('are used for their text without parsing it, through the cache\'s encoding', () => {
    const text = `${TEXT}\nAnother paragraph.\n`;
    const reference = unified().use(remarkParse).use(remarkGfm);
    const kept = deserialize(serialize(new Map([[text, reference.runSync(reference.parse(text)) as Root]]))) as Map<string, Root>;
    const fresh = templatesParsed().fresh;
    rememberParsed(kept);
    const filled = fillTemplate({ file: 'method.md', text }, values);
    expect(templatesParsed().fresh).toBe(fresh);
    expect(shape(filled.nodes.at(-1))).toEqual({ type: 'paragraph', children: [{ type: 'text', value: 'Another paragraph.' }] });
    // Something that is not a tree is not taken: the text is parsed.
    const odd = `${TEXT}\nOdd.\n`;
    rememberParsed(new Map([[odd, { type: 'paragraph' } as unknown as Root]]));
    expect(shape(fillTemplate({ file: 'method.md', text: odd }, values).nodes.at(-1))).toEqual({ type: 'paragraph', children: [{ type: 'text', value: 'Odd.' }] });
    expect(templatesParsed().fresh).toBe(fresh + 1);
  });
});
