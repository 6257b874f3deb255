/**
 * Reads the pack templates: the tool's own from its `templates/` folder,
 * each replaceable by a file of the same name in the workspace's
 * `templates/` folder (recorded as an input of the build).
 */
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { TEMPLATE_NAMES, type Template, type TemplateName, type Templates } from '../pack/template.ts';

export const TOOL_TEMPLATES = path.join(path.dirname(fileURLToPath(import.meta.url)), '../../templates');

export function readTemplates(workspaceRoot: string): { templates: Templates; inputs: Map<string, Uint8Array> } {
  const inputs = new Map<string, Uint8Array>();
  const entries = TEMPLATE_NAMES.map((name): [TemplateName, Template] => {
    const rel = `templates/${name}.md`;
    const own = path.join(workspaceRoot, rel);
    if (existsSync(own)) {
      const bytes = readFileSync(own);
      inputs.set(rel, bytes);
      return [name, { file: rel, text: bytes.toString('utf8') }];
    }
    return [name, { file: `(plumbline) ${rel}`, text: readFileSync(path.join(TOOL_TEMPLATES, `${name}.md`), 'utf8') }];
  });
  return { templates: Object.fromEntries(entries) as Templates, inputs };
}
