/**
 * The pack tree in parts: what comes before the first level-2 heading (the
 * cover), then each level-2 heading with what follows it. Every level-2
 * heading starts a page of pack.pdf and nothing in one part depends on
 * another, so each writer can make a part alone, and a rebuild can take
 * an unchanged part's pages, Markdown and HTML from the build cache.
 */
import type { Root, RootContent } from 'mdast';
import { madeOf } from './made-section.ts';

/** A made section (made-section.ts) starts a part, as the level-2 heading it stands for did. */
export function splitParts(tree: Root): RootContent[][] {
  const parts: RootContent[][] = [];
  for (const node of tree.children) {
    if ((node.type === 'heading' && node.depth === 2) || madeOf(node) || parts.length === 0) parts.push([]);
    parts[parts.length - 1]!.push(node);
  }
  return parts;
}
