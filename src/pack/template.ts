/**
 * Pack templates: Markdown files with placeholders. `{{name}}` alone in a
 * paragraph is replaced by generated blocks (tables, lists, charts);
 * `{{name}}` inside text by a string. Values are inserted as nodes, never as
 * Markdown source, so text from the data cannot become markup. Pure: the
 * template text is read elsewhere.
 */
import type { Root, RootContent } from 'mdast';
import remarkGfm from 'remark-gfm';
import remarkParse from 'remark-parse';
import { unified } from 'unified';
import { visit } from 'unist-util-visit';
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

function parse(text: string): Root {
  let tree = parsed.get(text);
  if (!tree) {
    tree = parser.runSync(parser.parse(text)) as Root;
    parsed.set(text, tree);
  }
  return structuredClone(tree);
}

export function fillTemplate(template: Template, values: Values): { nodes: RootContent[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const tree = parse(template.text);
  const unknown = (name: string, line: number | undefined) =>
    diagnostics.push(
      warning('template/unknown-placeholder', { file: template.file, ...(line ? { line } : {}) }, `{{${name}}} is not a placeholder this template can use; it is left as written.`),
    );
  const nodes: RootContent[] = [];
  for (const node of tree.children) {
    if (node.type === 'paragraph' && node.children.length === 1 && node.children[0]!.type === 'text') {
      const m = WHOLE.exec(node.children[0]!.value.trim());
      if (m) {
        const name = m[1]!;
        const blocks = values.blocks[name];
        if (blocks) {
          nodes.push(...structuredClone(blocks as RootContent[]));
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
