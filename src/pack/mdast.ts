/** Small builders for the mdast nodes the pack is made of. Text is always a text node, so it is escaped by every serialiser. */
import { printable } from '../format.ts';
import type { BlockContent, Code, Heading, Image, Link, List, Paragraph, PhrasingContent, RootContent, Strong, Table, TableCell, Text } from 'mdast';

export type Inline = PhrasingContent | string;

const phrasing = (items: readonly Inline[]): PhrasingContent[] => items.map((i) => (typeof i === 'string' ? text(i) : i));

export const text = (value: string): Text => ({ type: 'text', value: printable(value) });
export const strong = (...children: Inline[]): Strong => ({ type: 'strong', children: phrasing(children) });
export const paragraph = (...children: Inline[]): Paragraph => ({ type: 'paragraph', children: phrasing(children) });
export const link = (url: string, ...children: Inline[]): Link => ({ type: 'link', url, children: phrasing(children) });
export const code = (value: string, lang?: string): Code => ({ type: 'code', value, ...(lang ? { lang } : {}) });

export function heading(depth: 1 | 2 | 3 | 4, id: string | undefined, ...children: Inline[]): Heading {
  return { type: 'heading', depth, children: phrasing(children), ...(id ? { data: { hProperties: { id } } } : {}) };
}

export function list(items: readonly (readonly Inline[] | BlockContent[])[], ordered = false): List {
  return {
    type: 'list',
    ordered,
    spread: false,
    children: items.map((item) => ({
      type: 'listItem',
      spread: false,
      children: item.length > 0 && typeof item[0] === 'object' && isBlock(item[0]) ? (item as BlockContent[]) : [paragraph(...(item as Inline[]))],
    })),
  };
}

function isBlock(node: Inline | BlockContent): node is BlockContent {
  return typeof node === 'object' && ['paragraph', 'list', 'code', 'table', 'heading', 'blockquote'].includes(node.type);
}

export function table(header: readonly string[], rows: readonly (readonly Inline[] | string)[][], align?: readonly ('left' | 'right' | 'center' | null)[]): Table {
  const cell = (c: readonly Inline[] | string): TableCell => ({ type: 'tableCell', children: phrasing(typeof c === 'string' ? [c] : c) });
  return {
    type: 'table',
    align: align ? [...align] : header.map(() => null),
    children: [{ type: 'tableRow', children: header.map((h) => cell(h)) }, ...rows.map((r) => ({ type: 'tableRow' as const, children: r.map(cell) }))],
  };
}

/** A chart: an image whose file is the standalone SVG, carrying the chart's id for the HTML and PDF serialisers. */
export function chartImage(id: string, alt: string, file: string): Image {
  return { type: 'image', url: file, alt: printable(alt), data: { chartId: id } };
}

/** The chart a top-level block draws: a paragraph holding only a chart image (chartImage). */
export function chartIdOf(node: RootContent): string | undefined {
  if (node.type !== 'paragraph' || node.children.length !== 1) return undefined;
  const only = node.children[0]!;
  return only.type === 'image' ? only.data?.chartId : undefined;
}

/** Whether any node of `node` is a footnote reference or definition (the one thing that spans a tree's parts). */
export function hasFootnotes(node: { type: string; children?: unknown[] }): boolean {
  if (node.type === 'footnoteReference' || node.type === 'footnoteDefinition') return true;
  return node.children?.some((c) => hasFootnotes(c as { type: string; children?: unknown[] })) ?? false;
}

/** The ids of every chart image in `nodes`, at any depth (the HTML draws each one's scene). */
export function chartIdsIn(nodes: readonly { type: string; data?: unknown; children?: unknown[] }[], into: Set<string> = new Set()): Set<string> {
  for (const n of nodes) {
    const id = n.type === 'image' ? (n.data as Image['data'])?.chartId : undefined;
    if (id !== undefined) into.add(id);
    if (n.children) chartIdsIn(n.children as { type: string }[], into);
  }
  return into;
}

/** Plain text of a node tree (for slugs and the contents). */
export function plain(node: { type: string; value?: string; children?: unknown[] }): string {
  if (typeof node.value === 'string') return node.value;
  return (node.children ?? []).map((c) => plain(c as { type: string })).join('');
}

export function slug(s: string): string {
  return s
    .toLowerCase()
    .normalize('NFKD')
    .replace(/[^\p{L}\p{N}\s-]/gu, '')
    .trim()
    .replace(/[\s-]+/g, '-') || 'section';
}

declare module 'mdast' {
  interface ImageData {
    /** Set on chart images: the characteristic whose scene the serialisers draw in place of the file. */
    chartId?: string;
  }
}
