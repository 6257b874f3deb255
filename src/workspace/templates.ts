/**
 * Reads the pack templates: the tool's own from its `templates/` folder,
 * each replaceable by a file of the same name in the workspace's
 * `templates/` folder (recorded as an input of the build).
 */
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { type Diagnostic, error } from '../diagnostics.ts';
import { TEMPLATE_NAMES, type Template, type TemplateName, type Templates } from '../pack/template.ts';

export const TOOL_TEMPLATES = path.join(path.dirname(fileURLToPath(import.meta.url)), '../../templates');

export function readTemplates(workspaceRoot: string): { templates: Templates; inputs: Map<string, Uint8Array>; diagnostics: Diagnostic[] } {
  const inputs = new Map<string, Uint8Array>();
  const diagnostics: Diagnostic[] = [];
  const entries = TEMPLATE_NAMES.map((name): [TemplateName, Template] => {
    const rel = `templates/${name}.md`;
    const own = path.join(workspaceRoot, rel);
    const builtIn = (): Template => ({ file: `(plumbline) ${rel}`, text: readFileSync(path.join(TOOL_TEMPLATES, `${name}.md`), 'utf8') });
    if (!existsSync(own)) return [name, builtIn()];
    try {
      const bytes = readFileSync(own);
      inputs.set(rel, bytes);
      return [name, { file: rel, text: new TextDecoder('utf-8').decode(bytes) }];
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      diagnostics.push(
        error('template/unreadable', { file: rel }, `${rel} cannot be read (${code === 'EISDIR' ? 'it is a folder' : (code ?? String(e))}); fix it or remove it to use plumbline's own template.`),
      );
      return [name, builtIn()];
    }
  });
  return { templates: Object.fromEntries(entries) as Templates, inputs, diagnostics };
}
