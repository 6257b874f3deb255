/** index.md: the pack tree as GitHub-flavoured Markdown, charts as image files beside it. */
import type { Root } from 'mdast';
import remarkGfm from 'remark-gfm';
import remarkStringify from 'remark-stringify';
import { unified } from 'unified';

const processor = unified().use(remarkGfm).use(remarkStringify, { bullet: '-', fences: true, rule: '-' });

export function toMarkdown(tree: Root): string {
  return processor.stringify(tree);
}
