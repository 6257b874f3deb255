/** index.md: the pack tree as GitHub-flavoured Markdown, charts as image files beside it. */
import type { Root } from 'mdast';
import remarkGfm from 'remark-gfm';
import remarkStringify from 'remark-stringify';
import { unified } from 'unified';

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

// Text is defanged as it is written (the stock text handler is `state.safe(node.value, info)`),
// so the tree is neither changed nor copied: a plant's tree is tens of megabytes.
const processor = unified()
  .use(remarkGfm)
  .use(remarkStringify, { bullet: '-', fences: true, rule: '-', handlers: { text: (node, _parent, state, info) => state.safe(defang(node.value), info) } });

export function toMarkdown(tree: Root): string {
  return processor.stringify(tree);
}
