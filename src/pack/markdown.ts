/** index.md: the pack tree as GitHub-flavoured Markdown, charts as image files beside it. */
import type { Root, Text } from 'mdast';
import remarkGfm from 'remark-gfm';
import remarkStringify from 'remark-stringify';
import { unified } from 'unified';
import { visit } from 'unist-util-visit';

const processor = unified().use(remarkGfm).use(remarkStringify, { bullet: '-', fences: true, rule: '-' });

const ZWSP = '\u200b';

/**
 * GFM turns bare URLs, www. addresses and e-mail addresses in text into
 * links, and remark's escape of "https\://" does not stop it (nor GitHub's
 * renderer). Text from the data must not link out, so a zero-width space
 * goes where each of those patterns starts; the text reads the same. Only
 * index.md needs this: the HTML and PDF are made from the tree, not parsed.
 */
export function defang(value: string): string {
  return value
    .replace(/\b(https?|ftp|mailto|file|javascript|data|xmpp)(:)/gi, `$1${ZWSP}$2`)
    .replace(/\b(www)(\.)/gi, `$1${ZWSP}$2`)
    .replace(/([\w.+-])@/g, `$1${ZWSP}@`);
}

export function toMarkdown(tree: Root): string {
  const copy = structuredClone(tree);
  visit(copy, 'text', (t: Text) => {
    t.value = defang(t.value);
  });
  return processor.stringify(copy);
}
