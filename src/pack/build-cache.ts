/**
 * The incremental build cache: for each characteristic, its assessment
 * (with its chart and scene in files beside it), stored under a key that
 * hashes everything they are computed from; each part of the pack; and
 * where each characteristic's item sits in the pack's summary.json. A
 * rebuild after one data file changes finds every other characteristic
 * here and analyses and draws only that one; the pack is then assembled
 * from all of them as in a cold build, so its bytes are the same.
 *
 * The cache lives in the pack folder (`.plumbline-cache/`), because a build
 * writes nothing outside --out. It is not part of the pack: the manifest
 * does not list it and `verify` passes over it. An entry is found by key
 * alone, so a stale entry is never used; one that cannot be read is redone.
 */
import { createHash } from 'node:crypto';
import { closeSync, openSync, readFileSync, readSync, statSync } from 'node:fs';
import path from 'node:path';
import { deserialize, serialize } from 'node:v8';
import type { Assessment } from '../analyse.ts';
import type { Brief } from './brief.ts';
import type { MadeSection } from './made-section.ts';
import type { Template } from './template.ts';
import type { IsoDate } from '../model.ts';
import type { LaidOutPart, Paper } from './pdf.ts';
import type { KnownText, PlacedText } from './text-pages.ts';
import { type FileRange, type FileStamp, readRange, sameStamp, stampOf } from './write.ts';
import { TOOL } from '../version.ts';
import type { StoredLayouts } from '../render/fontkit.ts';
import type { Root } from 'mdast';
import type { CharacteristicInput, Workspace } from '../workspace/load.ts';
import type { ReviewConfig } from '../model.ts';
import { readReview } from '../workspace/review-file.ts';

export const CACHE_DIR = '.plumbline-cache';
/** Bump when what an entry holds, or how it is computed, changes without a tool version change. */
const FORMAT = 10;

/**
 * What is kept beside an entry, each in a file of its own that a rebuild
 * reads only if it must: the chart's SVG and PNG (copied into the pack as
 * they are) and its scene (serialised: read where a page that draws it is
 * made again). A plant's entries were 235 MB read whole, for each rebuild.
 * Its part of summary.json is found in the pack's own (openSummaryPieces).
 */
export const SIDE_KINDS = ['svg', 'png', 'scene'] as const;
export type SideKind = (typeof SIDE_KINDS)[number];

/** A side file's size. */
export interface SizedFile {
  readonly bytes: number;
}

/** A side file copied into the pack as it is: its size and SHA-256 go into the manifest. */
export interface HashedFile extends SizedFile {
  readonly sha256: string;
}

/** The side files kept, by kind: no scene or chart for a characteristic that could not be assessed, no PNG unless a build asked for one. */
export interface Sides {
  svg?: HashedFile;
  png?: HashedFile;
  scene?: SizedFile;
}

/**
 * What the cache's index holds of a characteristic: its brief and its side
 * files, and the size of its entry file (which holds its assessment). A
 * rebuild reads the index alone for an unchanged characteristic, and its
 * entry only if its chart or section must be made again.
 */
export interface IndexedEntry {
  readonly brief: Brief;
  readonly sides: Readonly<Sides>;
  readonly bytes: number;
  /** The stamps of the pack's chart files as the build wrote them (a later build links a file still so). */
  readonly packed: { readonly svg?: FileStamp; readonly png?: FileStamp };
}

/** A side file of a cache hit: where it is (relative to the pack folder), its record, and its bytes when read. */
export interface Side<F extends SizedFile = SizedFile> {
  readonly path: string;
  readonly file: F;
  read(): Uint8Array;
}

export interface CacheHit {
  readonly brief: Brief;
  readonly sides: Readonly<Sides>;
  /** Its assessment, read from its entry file when first asked for; undefined if that file is not what was written (it is then made afresh). */
  assessment(): Assessment | undefined;
  /** Where its entry file is (relative to the pack folder), and its size: linked, not read, by a rebuild that keeps it. */
  readonly path: string;
  readonly entryBytes: number;
  /** The stamps its pack's chart files were written with. */
  readonly packed: IndexedEntry['packed'];
  readonly side: <K extends SideKind>(kind: K) => Side<NonNullable<Sides[K]>> | undefined;
}

/**
 * The key of one characteristic: the tool, the review settings, the date,
 * the characteristic as configured, its ledger entries (with their lines,
 * which its messages quote) and what reading the ledger reported of it, and
 * its data file's bytes (or why it could not be read). Everything read from
 * the data is a function of these, so a hit never needs the data parsed.
 */
export function cacheKey(ws: Workspace, input: CharacteristicInput, asOf: IsoDate): string {
  const h = createHash('sha256');
  const data = 'bytes' in input.data ? null : input.data.problem;
  // JSON.stringify([FORMAT, TOOL, asOf, settings, configured, ledger, ledgerDiagnostics, data]), its
  // first four the same for every characteristic: written once (a plant's settings, 1,000 times).
  h.update(`[${sharedKeyPart(ws, asOf)},${JSON.stringify([input.configured, input.ledger, input.ledgerDiagnostics, data]).slice(1)}`);
  h.update('\u0000');
  if ('bytes' in input.data) h.update(input.data.bytes);
  return h.digest('hex');
}

const sharedParts = new WeakMap<Workspace, Map<IsoDate, string>>();

/** What every key of `ws` built for `asOf` starts with, as JSON array items (see cacheKey). */
function sharedKeyPart(ws: Workspace, asOf: IsoDate): string {
  let byDate = sharedParts.get(ws);
  if (!byDate) sharedParts.set(ws, (byDate = new Map()));
  let part = byDate.get(asOf);
  if (part === undefined) {
    const { characteristics: _all, ...settings } = ws.config;
    byDate.set(asOf, (part = JSON.stringify([FORMAT, TOOL, asOf, settings]).slice(1, -1)));
  }
  return part;
}

export const entryPath = (key: string) => `${CACHE_DIR}/${key}.v8`;
export const sidePath = (key: string, kind: SideKind) => `${CACHE_DIR}/${key}.${kind}`;

/** What the cache keeps, as its file's bytes (V8's serialisation, read back by openStored). */
export const encodeStored = (value: unknown): Uint8Array => new Uint8Array(serialize(value));

/** An entry file: the assessment alone. */
export const encodeEntry: (a: Assessment) => Uint8Array = encodeStored;

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

const isSideFile = (kind: string, f: unknown): boolean =>
  typeof f === 'object' && f !== null && Number.isSafeInteger((f as SizedFile).bytes) && (kind === 'scene' || typeof (f as HashedFile).sha256 === 'string');

const isIndexed = (e: unknown): e is IndexedEntry =>
  typeof e === 'object' &&
  e !== null &&
  typeof (e as IndexedEntry).brief === 'object' &&
  (e as IndexedEntry).brief !== null &&
  Number.isSafeInteger((e as IndexedEntry).bytes) &&
  typeof (e as IndexedEntry).sides === 'object' &&
  (e as IndexedEntry).sides !== null &&
  Object.entries((e as IndexedEntry).sides).every(([kind, f]) => (SIDE_KINDS as readonly string[]).includes(kind) && isSideFile(kind, f));

/** The cache's index of characteristics (IndexedEntry, by cache key), written by each build after their entries. */
export const ENTRY_INDEX = `${CACHE_DIR}/entries.v8`;

/** What a file of the cache holds (`file`, relative to `packDir`); undefined if it is missing or cannot be read back. */
function readStoredFile(packDir: string, file: string): unknown {
  try {
    return deserialize(readFileSync(path.join(packDir, file)));
  } catch {
    return undefined;
  }
}

/** Reads a map the cache keeps in one file; an empty one if the file is missing or not such a map. */
function readIndex(packDir: string, file: string): ReadonlyMap<string, unknown> {
  const index = readStoredFile(packDir, file);
  return index instanceof Map ? index : new Map();
}

const sizeOf = (file: string): number | undefined => {
  try {
    return statSync(file).size;
  } catch {
    return undefined;
  }
};

/**
 * The characteristics an earlier build left in `packDir`, by cache key. A
 * key is a hit only if its entry file and every side file it names are
 * there at their sizes; a side file that then cannot be read is an error
 * (the cache changed during the build), not a wrong pack.
 */
export function openCache(packDir: string): (key: string) => CacheHit | undefined {
  const index = readIndex(packDir, ENTRY_INDEX);
  return (key) => {
    const indexed = index.get(key);
    if (!isIndexed(indexed)) return undefined;
    const at = entryPath(key);
    if (sizeOf(path.join(packDir, at)) !== indexed.bytes) return undefined;
    const sides = indexed.sides;
    for (const [kind, file] of Object.entries(sides) as [SideKind, SizedFile][]) {
      if (sizeOf(path.join(packDir, sidePath(key, kind))) !== file.bytes) return undefined;
    }
    let assessment: Assessment | undefined | null = null;
    const side = <K extends SideKind>(kind: K): Side<NonNullable<Sides[K]>> | undefined => {
      const file = sides[kind] as NonNullable<Sides[K]> | undefined;
      if (!file) return undefined;
      const at = sidePath(key, kind);
      return {
        path: at,
        file,
        read: () => {
          const bytes: Uint8Array = readFileSync(path.join(packDir, at));
          if (bytes.length !== file.bytes) throw new Error(`${path.join(packDir, at)} changed during the build; build again`);
          return bytes;
        },
      };
    };
    return {
      brief: indexed.brief,
      sides,
      path: at,
      entryBytes: indexed.bytes,
      packed: typeof indexed.packed === 'object' && indexed.packed !== null ? indexed.packed : {},
      side,
      assessment: () => {
        if (assessment === null) {
          const value = readStoredFile(packDir, at);
          assessment = typeof value === 'object' && value !== null && 'status' in value && 'characteristic' in value ? (value as Assessment) : undefined;
        }
        return assessment;
      },
    };
  };
}

/** The key under which a characteristic's made section is kept: its cache key and the template its section is filled from. */
export function sectionKey(key: string, template: Template): string {
  return createHash('sha256').update(JSON.stringify([FORMAT, key, template.file, template.text])).digest('hex');
}

/** The cache's made sections (by `sectionKey`), written by each build. */
export const SECTION_INDEX = `${CACHE_DIR}/sections.v8`;

const isMadeSection = (m: unknown): m is MadeSection =>
  typeof m === 'object' &&
  m !== null &&
  typeof (m as MadeSection).digest === 'string' &&
  Array.isArray((m as MadeSection).headings) &&
  Array.isArray((m as MadeSection).charts) &&
  Array.isArray((m as MadeSection).diagnostics);

/** The characteristics' sections as an earlier build made them, by section key. */
export function openMadeSections(packDir: string): (key: string) => MadeSection | undefined {
  const index = readIndex(packDir, SECTION_INDEX);
  return (key) => {
    const made = index.get(key);
    return isMadeSection(made) ? made : undefined;
  };
}

/**
 * The key of one part of pack.pdf (a level-2 section, laid out alone): the
 * tool, the paper, the digest of the part's nodes (`nodesDigest`) and the keys of the characteristics
 * whose charts it draws (their scenes are made from what those keys hash).
 */
export function partKey(digest: string, chartKeys: readonly string[], paper: Paper): string {
  return createHash('sha256').update(JSON.stringify([FORMAT, TOOL, paper, chartKeys, digest])).digest('hex');
}

/**
 * One part of the pack as an earlier build made it: its pages of pack.pdf,
 * in a file under the part's key. Its index.md and index.html texts are
 * found in that build's own files (openPartTexts).
 */
export interface CachedPart {
  readonly pdf: LaidOutPart;
}

export const partPath = (key: string) => `${CACHE_DIR}/part-${key}.v8`;

const isPart = (p: unknown): p is LaidOutPart =>
  typeof p === 'object' && p !== null && Array.isArray((p as LaidOutPart).sheets) && (p as LaidOutPart).sheets.every((s) => s instanceof Uint8Array) &&
  Array.isArray((p as LaidOutPart).anchors) && Array.isArray((p as LaidOutPart).links) && Array.isArray((p as LaidOutPart).contentsLines) && Array.isArray((p as LaidOutPart).opacities) && Array.isArray((p as LaidOutPart).shaped);

const isCachedPart = (v: unknown): v is CachedPart => typeof v === 'object' && v !== null && isPart((v as CachedPart).pdf);

/** What an earlier build kept, read on demand: the value, and its file's bytes for a rebuild to link. */
export type Stored<T> = (key: string) => { readonly value: T; readonly bytes: () => Uint8Array } | undefined;

/** The pack's parts an earlier build left in `packDir`. */
export const openPartCache = (packDir: string): Stored<CachedPart> => openStored(packDir, partPath, isCachedPart);

/**
 * Where each characteristic's part of the pack's summary.json is (an item
 * of its `characteristics`, by cache key), with the file's size, SHA-256
 * and stamp (a check against edits; while the stamp is the same, the file
 * is not read through):
 * a rebuild puts an unchanged characteristic's part into the new file as
 * the bytes it finds there (a plant's summary.json is 86 MB; written afresh
 * it took 1.6 s), and uses none of them if the file is not the one indexed.
 */
export interface SummaryIndex {
  readonly bytes: number;
  readonly sha256: string;
  /** The file's stamp as written: while it is the same, the file is not read through for its SHA-256. */
  readonly stamp?: FileStamp | undefined;
  /** Cache key → [start, end) byte offsets. */
  readonly pieces: ReadonlyMap<string, readonly [number, number]>;
}

export const SUMMARY_INDEX = `${CACHE_DIR}/summary-index.v8`;
const SUMMARY_FILE = 'summary.json';

const isSummaryIndex = (v: unknown): v is SummaryIndex =>
  typeof v === 'object' && v !== null && Number.isSafeInteger((v as SummaryIndex).bytes) && typeof (v as SummaryIndex).sha256 === 'string' && (v as SummaryIndex).pieces instanceof Map;

/**
 * A piece of summary.json, by cache key: where it is, and its bytes, read
 * when asked for and valid until the next piece is read (every piece is
 * read into the same buffer; the JSON writers copy or write each at once).
 */
export type SummaryPieces = (key: string) => { readonly from: FileRange; readonly read: () => Uint8Array } | undefined;

/**
 * The parts of the summary.json in `packDir` that its index names, if the
 * file is the one indexed (its stamp, or its size and SHA-256, read through once, when a
 * part is first asked for); none otherwise. A part is read when it is
 * written into the new file.
 */
export function openSummaryPieces(packDir: string): SummaryPieces {
  const none: SummaryPieces = () => undefined;
  const index = readStoredFile(packDir, SUMMARY_INDEX);
  if (!isSummaryIndex(index) || index.pieces.size === 0) return none;
  const file = path.join(packDir, SUMMARY_FILE);
  // Checked when a part is first asked for: a build that asks for none (a long series, which the
  // cache does not keep, makes a summary.json of hundreds of megabytes) never reads the file.
  let valid: boolean | undefined;
  let scratch = new Uint8Array(0);
  const check = () => {
    try {
      return sameStamp(stampOf(file), index.stamp) || (statSync(file).size === index.bytes && digestOfFile(file, 'sha256') === index.sha256);
    } catch {
      return false;
    }
  };
  return (key) => {
    const range = index.pieces.get(key);
    if (!range || range[0] < 0 || range[1] > index.bytes || range[0] > range[1]) return undefined;
    if (!(valid ??= check())) return undefined;
    return {
      from: { file, start: range[0], end: range[1] },
      read: () => {
        const length = range[1] - range[0];
        // One buffer for every piece: a fresh one each time took 80–200 ms more for a plant's 86 MB (its pages are new).
        if (scratch.length < length) scratch = new Uint8Array(Math.max(length, scratch.length * 2));
        return readRange({ file, start: range[0], end: range[1] }, scratch.subarray(0, length));
      },
    };
  };
}

function digestOfFile(file: string, algorithm: string): string {
  const h = createHash(algorithm);
  const fd = openSync(file, 'r');
  try {
    const buffer = new Uint8Array(1 << 20);
    for (let n; (n = readSync(fd, buffer, 0, buffer.length, null)) > 0; ) h.update(buffer.subarray(0, n));
  } finally {
    closeSync(fd);
  }
  return h.digest('hex');
}


/** review.yaml's settings as the last build read them, with the key of the text they were read from. */
export const REVIEW_MEMO = `${CACHE_DIR}/review.v8`;

/**
 * review.yaml read through the cache of the pack in `packDir`: its
 * settings are a function of its text (and the tool), and a plant's
 * 1,000 characteristics took 0.2 s to parse and check, for every build.
 * `read` gives what `readReview` gives; `keep` the file for the new cache
 * (null if review.yaml could not be read), and whether it is the one read.
 */
export function reviewMemo(packDir: string): {
  read: (text: string) => ReturnType<typeof readReview>;
  keep: () => { readonly bytes: Uint8Array; readonly unchanged: boolean } | null;
} {
  const keyOf = (text: string) => createHash('sha256').update(JSON.stringify([FORMAT, TOOL])).update(text).digest('hex');
  let file: Uint8Array | undefined;
  let memo: unknown;
  try {
    file = readFileSync(path.join(packDir, REVIEW_MEMO));
    memo = deserialize(file);
  } catch {
    memo = undefined;
  }
  let kept: { bytes: Uint8Array; unchanged: boolean } | null = null;
  return {
    read: (text) => {
      const key = keyOf(text);
      const known = memo as { key?: unknown; config?: ReviewConfig } | undefined;
      if (known && known.key === key && typeof known.config === 'object' && known.config !== null && Array.isArray(known.config.characteristics)) {
        kept = { bytes: file!, unchanged: true };
        return { config: known.config, diagnostics: [] };
      }
      const parsed = readReview(text);
      kept = parsed.config && parsed.diagnostics.length === 0 ? { bytes: encodeStored({ key, config: parsed.config }), unchanged: false } : null;
      return parsed;
    },
    keep: () => kept,
  };
}

/** index.md or index.html as a build wrote it: its size, SHA-256 and stamp. */
export interface PageRecord {
  readonly bytes: number;
  readonly sha256: string;
  readonly stamp: FileStamp | undefined;
}

/**
 * Where each part's texts are in the pack's index.md and index.html (by
 * part key), with those files as written: a rebuild copies an unchanged
 * part's texts from there, and uses none if either file is not as written.
 */
export interface TextIndex {
  readonly md: PageRecord;
  readonly html: PageRecord;
  readonly parts: ReadonlyMap<string, PlacedText>;
}

export const TEXT_INDEX = `${CACHE_DIR}/texts.v8`;

const isPageRecord = (r: unknown): r is PageRecord => typeof r === 'object' && r !== null && Number.isSafeInteger((r as PageRecord).bytes) && typeof (r as PageRecord).sha256 === 'string';

/**
 * The texts of the pack's parts in `packDir`, by part key: where they are
 * in its index.md and index.html, if both files are as the index says (by
 * their stamps, else read through for their SHA-256s, once, when a part is
 * first asked for).
 */
export function openPartTexts(packDir: string): (key: string) => KnownText | undefined {
  const index = readStoredFile(packDir, TEXT_INDEX);
  const i = index as TextIndex;
  if (typeof index !== 'object' || index === null || !isPageRecord(i.md) || !isPageRecord(i.html) || !(i.parts instanceof Map)) return () => undefined;
  const md = path.join(packDir, 'index.md');
  const html = path.join(packDir, 'index.html');
  const asWritten = (file: string, r: PageRecord) => {
    if (sameStamp(stampOf(file), r.stamp)) return true;
    try {
      return statSync(file).size === r.bytes && digestOfFile(file, 'sha256') === r.sha256;
    } catch {
      return false;
    }
  };
  let valid: boolean | undefined;
  return (key) => {
    const at = i.parts.get(key);
    if (!Array.isArray(at) || at.length !== 4 || !(at[0] <= at[1] && at[1] <= i.md.bytes && at[2] <= at[3] && at[3] <= i.html.bytes)) return undefined;
    if (!(valid ??= asWritten(md, i.md) && asWritten(html, i.html))) return undefined;
    return { md: { file: md, start: at[0], end: at[1] }, html: { file: html, start: at[2], end: at[3] } };
  };
}

/** The comparison record (record.json) as the build wrote it: the tool and the file's stamp. */
export const RECORD_STAMP = `${CACHE_DIR}/record.v8`;

export const recordStamp = (into: string): Uint8Array => encodeStored({ format: FORMAT, tool: TOOL, stamp: stampOf(path.join(into, 'record.json')) });

/**
 * Whether the pack in `packDir` holds the record.json this tool's build
 * wrote there, unchanged (by its stamp): the next build then takes it as
 * written, without checking it as untrusted input (0.05–0.06 s of a
 * plant's rebuild, for a 2.2 MB file).
 */
export function recordAsWritten(packDir: string): boolean {
  const v = readStoredFile(packDir, RECORD_STAMP) as { format?: unknown; tool?: { name?: unknown; version?: unknown }; stamp?: unknown } | undefined;
  return v?.format === FORMAT && v.tool?.name === TOOL.name && v.tool?.version === TOOL.version && sameStamp(stampOf(path.join(packDir, 'record.json')), v.stamp);
}

/** What the last build's fonts laid out (fontkit.ts, `wordsShaped`: words shaped whole, pairs), by the SHA-256 of each font file. */
export const SHAPED_WORDS = `${CACHE_DIR}/words.v8`;

/** One face's record: its layouts, and the parts of its font objects in pack.pdf (pdf-font.ts, FontParts; checked as they are taken). */
export interface FaceLayouts extends StoredLayouts {
  readonly pdf?: unknown;
}

export const shapedWordsFile = (faces: ReadonlyMap<string, FaceLayouts>): Uint8Array => encodeStored({ format: FORMAT, tool: TOOL, faces });

/**
 * What the build of the pack in `packDir` laid out with the font file of
 * a given SHA-256, for this tool (a layout is a function of the font's
 * bytes and fontkit's version, which the tool's version pins); undefined
 * where there is nothing. Each kept layout is checked as it is used
 * (fontkit.ts).
 */
export function openShapedWords(packDir: string): (fontSha256: string) => FaceLayouts | undefined {
  const v = readStoredFile(packDir, SHAPED_WORDS) as { format?: unknown; tool?: { name?: unknown; version?: unknown }; faces?: unknown } | undefined;
  const ok = v?.format === FORMAT && v.tool?.name === TOOL.name && v.tool?.version === TOOL.version && v.faces instanceof Map;
  return (sha) => {
    const face = ok ? ((v.faces as Map<unknown, unknown>).get(sha) as Partial<FaceLayouts> | undefined) : undefined;
    return face && face.words instanceof Map && face.pairs instanceof Map && Array.isArray(face.plain) ? (face as FaceLayouts) : undefined;
  };
}

/** The templates' syntax trees the last build parsed, by template text (template.ts, `templatesParsed`). */
export const TEMPLATE_TREES = `${CACHE_DIR}/templates.v8`;

export const templateTreesFile = (trees: ReadonlyMap<string, Root>): Uint8Array => encodeStored({ format: FORMAT, tool: TOOL, trees });

/** The templates' trees the build of the pack in `packDir` parsed, for this tool; undefined where there are none. */
export function openTemplateTrees(packDir: string): ReadonlyMap<string, Root> | undefined {
  const v = readStoredFile(packDir, TEMPLATE_TREES) as { format?: unknown; tool?: { name?: unknown; version?: unknown }; trees?: unknown } | undefined;
  return v?.format === FORMAT && v.tool?.name === TOOL.name && v.tool?.version === TOOL.version && v.trees instanceof Map ? (v.trees as ReadonlyMap<string, Root>) : undefined;
}
