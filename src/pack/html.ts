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

/**
 * The page. `whole` converts the tree as one document, the plain use of
 * remark-rehype; the block-by-block route below must give the same bytes
 * (test/pack/content.test.ts compares them).
 */
export interface HtmlParts {
  /** The tree's top-level nodes in parts (splitParts); the page's body is theirs in order. */
  readonly parts: readonly (readonly RootContent[])[];
  /** A part's body HTML as an earlier build wrote it, if known. */
  readonly known: (i: number) => string | undefined;
  /** Hears of each part's body HTML written here. */
  readonly fresh: (i: number, html: string) => void;
}

export function toHtml(input: HtmlInput, { whole = false, parts }: { readonly whole?: boolean; readonly parts?: HtmlParts } = {}): string {
  const toHast = unified().use(remarkRehype, {
    handlers: {
      image(state, node) {
        const id = node.data?.chartId;
        const scene = id ? input.scenes.get(id) : undefined;
        if (!scene || !id) return state.all(node) as unknown as Element;
        return el('figure', { className: ['chart'] }, [inlineSvg(scene, `chart-${id}`)]);
      },
      // Links inside the pack go to sections; anything else stays text, so nothing in the page points outside it.
      link(state, node) {
        const children = state.all(node);
        return node.url.startsWith('#') ? el('a', { href: node.url }, children) : el('span', {}, children);
      },
    },
  });
  const toText = unified().use(rehypeStringify);
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
  let body: string[];
  const footnotes = hasFootnotes(input.tree);
  // Parts are written alone and kept apart, so a tree given in parts must have no footnotes (the caller converts such a tree whole).
  if (parts && footnotes) throw new Error('internal: a tree with footnotes is converted whole, not in parts');
  if (whole || footnotes) {
    const hast = toHast.runSync(input.tree) as HastRoot;
    body = hast.children.length > 0 ? [toText.stringify(hast)] : [];
  } else if (parts) {
    // A part's HTML is its blocks' joined as the body joins them; a part that makes nothing adds no line.
    body = parts.parts.map((nodes, i) => {
      let html = parts.known(i);
      if (html === undefined) parts.fresh(i, (html = convert(nodes).join('\n')));
      return html;
    });
    body = body.filter((h) => h !== '');
  } else body = convert(input.tree.children);
  return `${page.slice(0, at)}<main>${body.join('\n')}</main>${page.slice(at + '<main></main>'.length)}\n`;
}
