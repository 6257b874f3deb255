/**
 * A characteristic's section as an earlier build made it, standing in the
 * tree for the nodes it was: one part of the pack (its level-2 heading and
 * what follows it), whose pages, Markdown and HTML that build left in the
 * cache under the part's key. What the tree needs of it without the nodes
 * is here: its headings, for the ids and the contents list, the charts it
 * draws, and its digest, from which the part's key is made.
 *
 * A rebuild puts one in for each unchanged characteristic, so that it never
 * builds the section again, nor reads back the assessment it is built from.
 */
import type { Node, RootContent } from 'mdast';
import type { Diagnostic } from '../diagnostics.ts';
import { createHash } from 'node:crypto';

/** A heading of level 1 or 2 in the section, as `assignIds` gave it its id. */
export interface MadeHeading {
  /** The id before duplicates were told apart: the one the section gave it, or its text's slug. */
  readonly base: string;
  /** The id it was given. */
  readonly id: string;
  readonly depth: number;
  /** Its text, for the contents list. */
  readonly title: string;
}

export interface MadeSection {
  /** SHA-256 of the section's nodes as the tree held them, ids given (`nodesDigest`). */
  readonly digest: string;
  readonly headings: readonly MadeHeading[];
  /** Ids of the characteristics whose charts it draws. */
  readonly charts: readonly string[];
  /** What filling its template reported. */
  readonly diagnostics: readonly Diagnostic[];
}

const SECTION_NODE = 'plumblineMadeSection';

/** The tree's node for a made section: a part of its own, which no writer lays out again. */
interface SectionNode extends Node {
  readonly type: typeof SECTION_NODE;
  readonly made: MadeSection;
}

export const sectionNode = (made: MadeSection): RootContent => ({ type: SECTION_NODE, made }) as SectionNode as unknown as RootContent;

/** The made section a node of the tree stands for, if it is one. */
export const madeOf = (n: { readonly type: string }): MadeSection | undefined => (n.type === SECTION_NODE ? (n as unknown as SectionNode).made : undefined);

/** The digest a part's key is made from: of its nodes as JSON (every writer reads them so). */
export const nodesDigest = (nodes: readonly RootContent[]): string => createHash('sha256').update(JSON.stringify(nodes)).digest('hex');
