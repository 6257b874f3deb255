/**
 * The incremental build cache: for each characteristic, its assessment,
 * chart scene, drawn chart and part of summary.json, stored under a key that hashes everything
 * they are computed from. A rebuild after one data file changes finds every
 * other characteristic here and analyses and draws only that one; the pack
 * is then assembled from all of them as in a cold build, so its bytes are
 * the same.
 *
 * The cache lives in the pack folder (`.plumbline-cache/`), because a build
 * writes nothing outside --out. It is not part of the pack: the manifest
 * does not list it and `verify` passes over it. An entry is found by key
 * alone, so a stale entry is never used; one that cannot be read is redone.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { deserialize, serialize } from 'node:v8';
import type { RootContent } from 'mdast';
import type { Assessment } from '../analyse.ts';
import type { IsoDate } from '../model.ts';
import type { LaidOutPart, Paper } from './pdf.ts';
import type { PartText } from './text-pages.ts';
import { TOOL } from '../version.ts';
import type { CharacteristicInput, Workspace } from '../workspace/load.ts';

export const CACHE_DIR = '.plumbline-cache';
/** Bump when what an entry holds, or how it is computed, changes without a tool version change. */
const FORMAT = 4;

export interface CacheEntry {
  readonly assessment: Assessment;
  /**
   * The chart's scene, serialised on its own (encodeStored): read only
   * where a page that draws it is made again. Null for a characteristic
   * that could not be assessed.
   */
  readonly scene: Uint8Array | null;
  /** The standalone SVG file's bytes. */
  readonly svg: Uint8Array | null;
  /** Drawn only by builds that asked for PNGs; drawn from `svg` when a later build asks. */
  readonly png: Uint8Array | null;
  /** The characteristic's part of summary.json as written (an item of its `characteristics`), or null if not kept. */
  readonly summary: Uint8Array | null;
}

/**
 * The key of one characteristic: the tool, the review settings, the date,
 * the characteristic's settings, its ledger entries (with their lines, which
 * its messages quote), what reading it reported and its data file's bytes.
 */
export function cacheKey(ws: Workspace, input: CharacteristicInput, asOf: IsoDate): string {
  const { characteristics: _all, ...settings } = ws.config;
  const h = createHash('sha256');
  h.update(JSON.stringify([FORMAT, TOOL, asOf, settings, input.characteristic, input.ledger, input.diagnostics, [...input.laterLabels]]));
  h.update('\u0000');
  const data = ws.inputs.get(input.characteristic.data);
  if (data) h.update(data);
  return h.digest('hex');
}

export const entryPath = (key: string) => `${CACHE_DIR}/${key}.v8`;

/** What the cache keeps, as its file's bytes (V8's serialisation, read back by openStored). */
export const encodeStored = (value: unknown): Uint8Array => new Uint8Array(serialize(value));

export const encodeEntry: (e: CacheEntry) => Uint8Array = encodeStored;

/**
 * What an earlier build left in `packDir` under `pathOf(key)`, read on
 * demand and kept only if `valid` accepts it. Its bytes are read again if
 * they are asked for (a rebuild links the file instead, and only falls back
 * to writing it where links cannot be made): a plant's entries are 200 MB
 * that a rebuild held to the end.
 */
function openStored<T>(packDir: string, pathOf: (key: string) => string, valid: (v: unknown) => v is T): Stored<T> {
  return (key) => {
    const file = path.join(packDir, pathOf(key));
    let value: unknown;
    try {
      value = deserialize(readFileSync(file));
    } catch {
      return undefined;
    }
    if (!valid(value)) return undefined;
    const bytes = () => {
      try {
        return new Uint8Array(readFileSync(file));
      } catch {
        // Gone since it was read: the same value, encoded again.
        return encodeStored(value);
      }
    };
    return { value, bytes };
  };
}

const isEntry = (e: unknown): e is CacheEntry =>
  typeof e === 'object' && e !== null && typeof (e as CacheEntry).assessment === 'object' &&
  ((e as CacheEntry).scene === null || (e as CacheEntry).scene instanceof Uint8Array) && ((e as CacheEntry).summary === null || (e as CacheEntry).summary instanceof Uint8Array);

/** The characteristics' entries an earlier build left in `packDir`. */
export function openCache(packDir: string): (key: string) => { entry: CacheEntry; bytes: () => Uint8Array } | undefined {
  const read = openStored(packDir, entryPath, isEntry);
  return (key) => {
    const hit = read(key);
    return hit && { entry: hit.value, bytes: hit.bytes };
  };
}

/**
 * The key of one part of pack.pdf (a level-2 section, laid out alone): the
 * tool, the paper, the part's nodes and the keys of the characteristics
 * whose charts it draws (their scenes are made from what those keys hash).
 */
export function partKey(nodes: readonly RootContent[], chartKeys: readonly string[], paper: Paper): string {
  return createHash('sha256').update(JSON.stringify([FORMAT, TOOL, paper, chartKeys, nodes])).digest('hex');
}

export const partPath = (key: string) => `${CACHE_DIR}/pdf-${key}.v8`;

const isPart = (p: unknown): p is LaidOutPart =>
  typeof p === 'object' && p !== null && Array.isArray((p as LaidOutPart).sheets) && (p as LaidOutPart).sheets.every((s) => s instanceof Uint8Array) &&
  Array.isArray((p as LaidOutPart).anchors) && Array.isArray((p as LaidOutPart).links) && Array.isArray((p as LaidOutPart).contentsLines) && Array.isArray((p as LaidOutPart).opacities) && Array.isArray((p as LaidOutPart).shaped);

/** What an earlier build kept, read on demand: the value, and its file's bytes for a rebuild to link. */
export type Stored<T> = (key: string) => { readonly value: T; readonly bytes: () => Uint8Array } | undefined;

/** The laid-out PDF parts an earlier build left in `packDir`. */
export const openPartCache = (packDir: string): Stored<LaidOutPart> => openStored(packDir, partPath, isPart);

/** A part's index.md text and index.html body, under the same key as its PDF pages. */
export const textPath = (key: string) => `${CACHE_DIR}/text-${key}.v8`;

const isText = (t: unknown): t is PartText => typeof t === 'object' && t !== null && typeof (t as PartText).md === 'string' && typeof (t as PartText).html === 'string';

/** The parts' Markdown and HTML an earlier build left in `packDir`. */
export const openTextCache = (packDir: string): Stored<PartText> => openStored(packDir, textPath, isText);
