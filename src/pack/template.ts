/**
 * Pack templates: Markdown files with placeholders. `{{name}}` alone in a
 * paragraph is replaced by generated blocks (tables, lists, charts);
 * `{{name}}` inside text by a string. Values are inserted as nodes, never as
 * Markdown source, so text from the data cannot become markup. Pure: the
 * template text is read elsewhere.
 */
import type { Definition, Root, RootContent } from 'mdast';
import remarkGfm from 'remark-gfm';
import remarkParse from 'remark-parse';
import { unified } from 'unified';
import { SKIP, visit } from 'unist-util-visit';
import { type Diagnostic, warning } from '../diagnostics.ts';
import { printable } from '../format.ts';

export const TEMPLATE_NAMES = ['pack', 'characteristic', 'cautions', 'method'] as const;
export type TemplateName = (typeof TEMPLATE_NAMES)[number];

export interface Template {
  /** Where it came from, for diagnostics: `templates/pack.md` of the tool or of the workspace. */
  readonly file: string;
  readonly text: string;
}

export type Templates = Readonly<Record<TemplateName, Template>>;

export interface Values {
  readonly blocks: Readonly<Record<string, readonly RootContent[]>>;
  readonly strings: Readonly<Record<string, string>>;
}

const WHOLE = /^\{\{\s*([a-z][a-z0-9-]*)\s*\}\}$/;
const INLINE = /\{\{\s*([a-z][a-z0-9-]*)\s*\}\}/g;

const parser = unified().use(remarkParse).use(remarkGfm);
const parsed = new Map<string, Root>();
/** How many template texts were parsed since the module was loaded (not taken from rememberParsed). */
let parsedHere = 0;

function parse(text: string): Root {
  let tree = parsed.get(text);
  if (!tree) {
    tree = parser.runSync(parser.parse(text)) as Root;
    inlineReferences(tree);
    parsed.set(text, tree);
    parsedHere++;
  }
  return copyTree(tree);
}

/**
 * Trees an earlier build parsed, by template text: a syntax tree is a
 * function of the text (and the parser, which the tool's version pins),
 * and parsing the four templates took 50–80 ms of every build.
 */
export function rememberParsed(trees: ReadonlyMap<string, Root>): void {
  for (const [text, tree] of trees) {
    if (typeof text === 'string' && typeof tree === 'object' && tree !== null && tree.type === 'root' && Array.isArray(tree.children) && !parsed.has(text)) parsed.set(text, tree);
  }
}

/**
 * The trees of `templates` known here (parsed, or kept by an earlier
 * build), by text, for a later build; `fresh`: how many texts were parsed
 * since the module was loaded. A template a build did not fill in (a
 * rebuild takes every unchanged characteristic's section whole) keeps its
 * tree.
 */
export function templatesParsed(templates: Templates): { readonly trees: ReadonlyMap<string, Root>; readonly fresh: number } {
  const trees = new Map<string, Root>();
  for (const name of TEMPLATE_NAMES) {
    const tree = parsed.get(templates[name].text);
    if (tree) trees.set(templates[name].text, tree);
  }
  return { trees, fresh: parsedHere };
}

/**
 * A deep copy of a syntax tree, which holds only plain objects, arrays and
 * primitives: a characteristic's template is copied once per
 * characteristic, and structuredClone took five times as long.
 */
export function copyTree<T>(value: T): T {
  if (typeof value !== 'object' || value === null) return value;
  if (Array.isArray(value)) return value.map(copyTree) as T;
  const out: Record<string, unknown> = {};
  for (const k in value) out[k] = copyTree((value as Record<string, unknown>)[k]);
  return out as T;
}

/**
 * Reference-style links and images (`[text][id]` with `[id]: url` below)
 * become the inline links and images they stand for, and the definitions
 * go: every writer then applies one policy to every link (HTML keeps only
 * links within the pack; a reference once reached the page as a live
 * `href`, `javascript:` included), and no block of the tree depends on a
 * definition in another. A reference exists only where its definition
 * does (CommonMark), and the first definition of an identifier wins.
 */
function inlineReferences(tree: Root): void {
  const defined = new Map<string, Definition>();
  visit(tree, 'definition', (d) => {
    if (!defined.has(d.identifier)) defined.set(d.identifier, d);
  });
  visit(tree, (node, index, parent) => {
    if (!parent || index === undefined) return;
    if (node.type === 'definition') {
      parent.children.splice(index, 1);
      return [SKIP, index];
    }
    if (node.type !== 'linkReference' && node.type !== 'imageReference') return;
    const d = defined.get(node.identifier);
    const at = { url: d?.url ?? '', title: d?.title ?? null };
    (parent.children as RootContent[])[index] = node.type === 'linkReference' ? { type: 'link', ...at, children: node.children } : { type: 'image', ...at, alt: node.alt ?? null };
    return undefined;
  });
}

export function fillTemplate(template: Template, values: Values): { nodes: RootContent[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const tree = parse(template.text);
  const unknown = (name: string, line: number | undefined) =>
    diagnostics.push(
      warning('template/unknown-placeholder', { file: template.file, ...(line ? { line } : {}) }, `{{${name}}} is not a placeholder this template can use; it is left as written.`),
    );
  const nodes: RootContent[] = [];
  // Generated blocks go in as they are; a placeholder used a second time gets a copy, so no node sits
  // in the tree twice (the writers may annotate nodes). Copying every block cost 0.9 s of a plant's 2.2 s tree.
  const placed = new Set<string>();
  for (const node of tree.children) {
    if (node.type === 'paragraph' && node.children.length === 1 && node.children[0]!.type === 'text') {
      const m = WHOLE.exec(node.children[0]!.value.trim());
      if (m) {
        const name = m[1]!;
        const blocks = values.blocks[name];
        if (blocks) {
          nodes.push(...(placed.has(name) ? copyTree(blocks as RootContent[]) : blocks));
          placed.add(name);
          continue;
        }
        if (!(name in values.strings)) {
          unknown(name, node.position?.start.line);
          nodes.push(node);
          continue;
        }
      }
    }
    visit(node, 'text', (t) => {
      t.value = t.value.replace(INLINE, (whole, name: string) => {
        const v = values.strings[name];
        if (v !== undefined) return printable(v);
        unknown(name, t.position?.start.line);
        return whole;
      });
    });
    nodes.push(node);
  }
  return { nodes, diagnostics };
}
