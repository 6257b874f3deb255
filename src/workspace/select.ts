/**
 * A customer's pack: the workspace narrowed to the characteristics with one
 * tag (`build --only tag=NAME`). The manifest then lists only what went into
 * that pack: review.yaml, the ledger, the templates and the data files of
 * the chosen characteristics. Pure.
 */
import type { Workspace } from './load.ts';

export interface Selection {
  readonly workspace: Workspace;
  /** The name review.yaml gives that tag under `customers`, if any. */
  readonly name: string | null;
}

/** Every tag in use, sorted, for the message when a tag matches nothing. */
export function tagsOf(ws: Workspace): string[] {
  return [...new Set(ws.characteristics.flatMap((c) => c.configured.tags))].sort();
}

/** Null when no characteristic carries the tag. */
export function selectByTag(ws: Workspace, tag: string): Selection | null {
  const kept = ws.characteristics.filter((c) => c.configured.tags.includes(tag));
  if (kept.length === 0) return null;
  const dropped = new Set(ws.characteristics.filter((c) => !kept.includes(c)).map((c) => c.configured.data));
  for (const c of kept) dropped.delete(c.configured.data);
  const ids = new Set(kept.map((c) => c.configured.id));
  return {
    workspace: {
      ...ws,
      config: { ...ws.config, characteristics: ws.config.characteristics.filter((c) => ids.has(c.id)) },
      characteristics: kept,
      diagnostics: ws.diagnostics.filter((d) => d.characteristic === undefined || ids.has(d.characteristic)),
      inputs: new Map([...ws.inputs].filter(([file]) => !dropped.has(file))),
    },
    name: ws.config.customers[tag] ?? null,
  };
}
