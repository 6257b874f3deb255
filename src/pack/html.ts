/**
 * index.html: one self-contained page. Charts are inline SVG drawn from the
 * same scenes with real `<text>`; the font is embedded once as a data-URL
 * `@font-face`; styles are inline; there are no scripts and no external
 * requests, and a Content-Security-Policy forbids both.
 */
import type { Element, ElementContent, Root as HastRoot } from 'hast';
import type { Root, RootContent } from 'mdast';
import rehypeStringify from 'rehype-stringify';
import remarkRehype from 'remark-rehype';
import { unified } from 'unified';
import { FONT_FAMILY } from '../render/fonts.ts';
import type { Scene } from '../render/scene/types.ts';
import { inlineSvg } from '../render/svg-inline.ts';
import { type ByteSink, type FileRange, memorySink } from './bytes.ts';
import { hasFootnotes } from './mdast.ts';
import { PACK_CSS } from './style.ts';

export interface HtmlInput {
  readonly tree: Root;
  readonly title: string;
  readonly lang?: string;
  readonly scenes: ReadonlyMap<string, Scene>;
  readonly fonts: { readonly regular: Uint8Array; readonly semibold: Uint8Array };
}

const CSP = "default-src 'none'; style-src 'unsafe-inline'; font-src data:; img-src data:; base-uri 'none'; form-action 'none'";

const el = (tagName: string, properties: Element['properties'], children: ElementContent[] = []): Element => ({ type: 'element', tagName, properties, children });
const txt = (value: string) => ({ type: 'text' as const, value });

function fontFace(bytes: Uint8Array, weight: number): string {
  return `@font-face{font-family:"${FONT_FAMILY}";font-weight:${weight};font-style:normal;src:url(data:font/ttf;base64,${Buffer.from(bytes).toString('base64')}) format("truetype")}`;
}

/** The tree in parts for toHtmlByParts; a part's body HTML is UTF-8 bytes. */
export interface HtmlParts {
  /** The tree's top-level nodes in parts (splitParts); the page's body is theirs in order. */
  readonly parts: readonly (readonly RootContent[])[];
  /** A part's body HTML as an earlier build wrote it, if known: its bytes, or where they are in that build's index.html. */
  readonly known: (i: number) => Uint8Array | FileRange | undefined;
  /** Hears of each part's body HTML written here. */
  readonly fresh: (i: number, html: Uint8Array) => void;
}

const encoder = new TextEncoder();
const NEWLINE = encoder.encode('\n');

/** The page's two ends around its body, and the writer of a run of top-level blocks. */
function pageParts(input: HtmlInput) {
  const toHast = unified().use(remarkRehype, {
    handlers: {
      image(state, node) {
        const id = node.data?.chartId;
        const scene = id ? input.scenes.get(id) : undefined;
        if (!scene || !id) return state.all(node) as unknown as Element;
        // The chart's markup as it is (see svg-inline.ts): the one raw node in the page.
        return el('figure', { className: ['chart'] }, [{ type: 'raw', value: inlineSvg(scene, `chart-${id}`) }]);
      },
      // Links inside the pack go to sections; anything else stays text, so nothing in the page points outside it.
      link(state, node) {
        const children = state.all(node);
        return node.url.startsWith('#') ? el('a', { href: node.url }, children) : el('span', {}, children);
      },
    },
  });
  // Raw nodes are written as they are: only the charts' markup makes them. remark-rehype is not told
  // to allow HTML, so raw HTML from a template or the data is dropped before it gets here.
  const toText = unified().use(rehypeStringify, { allowDangerousHtml: true });
  const css = `${fontFace(input.fonts.regular, 400)}\n${fontFace(input.fonts.semibold, 600)}\n${PACK_CSS}`;
  const doc: HastRoot = {
    type: 'root',
    children: [
      { type: 'doctype' },
      el('html', { lang: input.lang ?? 'en' }, [
        el('head', {}, [
          el('meta', { charSet: 'utf-8' }),
          el('meta', { httpEquiv: 'Content-Security-Policy', content: CSP }),
          el('meta', { name: 'viewport', content: 'width=device-width, initial-scale=1' }),
          el('title', {}, [txt(input.title)]),
          el('style', {}, [txt(css)]),
        ]),
        el('body', {}, [el('main', {}, [])]),
      ]),
    ],
  };
  // The page around an empty <main>, then the body one top-level block at a time: a plant's
  // whole body as one hast tree (every chart's SVG elements) was hundreds of megabytes in
  // the page worker. mdast-util-to-hast writes a root's blocks (those that make anything)
  // with a newline between them, and hast-util-to-html a root as its children one after
  // another, so the pieces joined the same way are the same bytes. Footnotes are the one
  // thing that spans blocks (references number them, the list comes at the end; templates
  // have reference links made inline), so a tree with any is converted whole.
  const page = toText.stringify(doc);
  const at = page.indexOf('<main></main>');
  if (at < 0 || page.indexOf('<main></main>', at + 1) >= 0) throw new Error('internal: the page template has no single empty <main>');
  const convert = (nodes: readonly RootContent[]): string[] => {
    const out: string[] = [];
    for (const node of nodes) {
      const hast = toHast.runSync({ type: 'root', children: [node] }) as HastRoot;
      if (hast.children.length > 0) out.push(toText.stringify(hast));
    }
    return out;
  };
  const whole = (tree: Root): string[] => {
    const hast = toHast.runSync(tree) as HastRoot;
    return hast.children.length > 0 ? [toText.stringify(hast)] : [];
  };
  return { before: `${page.slice(0, at)}<main>`, after: `</main>${page.slice(at + '<main></main>'.length)}\n`, convert, whole };
}

/**
 * The page. `whole` converts the tree as one document, the plain use of
 * remark-rehype; the block-by-block route must give the same bytes
 * (test/pack/content.test.ts compares them).
 */
export function toHtml(input: HtmlInput, { whole = false }: { readonly whole?: boolean } = {}): string {
  const page = pageParts(input);
  const body = whole || hasFootnotes(input.tree) ? page.whole(input.tree) : page.convert(input.tree.children);
  return `${page.before}${body.join('\n')}${page.after}`;
}

/**
 * The page as UTF-8 bytes from the tree's parts, each converted alone or,
 * where `parts.known` has it, taken as an earlier build wrote it: a part's
 * HTML is its blocks' joined as the body joins them, and a part that makes
 * nothing adds no line (test/pack/parts.test.ts compares the bytes with
 * `toHtml(…, { whole: true })`). Parts are written alone and kept apart, so
 * `input.tree` (the nodes of the parts to convert) must have no footnotes:
 * a tree with any is converted whole, by toHtml.
 */
export function toHtmlByParts(input: HtmlInput, parts: HtmlParts): Uint8Array {
  const sink = memorySink(() => {
    throw new Error('internal: no part is known by its place in a file here');
  });
  writeHtmlByParts(input, parts, sink);
  return sink.bytes();
}

/**
 * index.html into `sink`, part by part: a known part as its bytes, or as
 * the range of an earlier index.html that holds them; `placed` hears where
 * each part's bytes went (an empty part's range is empty).
 */
export function writeHtmlByParts(input: HtmlInput, parts: HtmlParts, sink: ByteSink, placed: (i: number, start: number, end: number) => void = () => {}): void {
  if (hasFootnotes(input.tree)) throw new Error('internal: a tree with footnotes is converted whole, not in parts');
  const page = pageParts(input);
  sink.write(encoder.encode(page.before));
  let first = true;
  parts.parts.forEach((nodes, i) => {
    let html = parts.known(i);
    if (html === undefined) parts.fresh(i, (html = encoder.encode(page.convert(nodes).join('\n'))));
    const length = html instanceof Uint8Array ? html.length : html.end - html.start;
    if (length === 0) return placed(i, sink.length, sink.length);
    if (!first) sink.write(NEWLINE);
    const start = sink.length;
    if (html instanceof Uint8Array) sink.write(html);
    else sink.copy(html);
    placed(i, start, sink.length);
    first = false;
  });
  sink.write(encoder.encode(page.after));
}
