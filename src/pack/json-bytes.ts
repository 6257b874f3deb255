/**
 * JSON.stringify(value, null, 2) as bytes, written piece by piece: a
 * summary.json of a million points is larger than the longest string a
 * JavaScript engine will build, so the text is encoded in chunks and never
 * held whole. The output is byte for byte what JSON.stringify would write.
 */
import { LazyList } from '../lazy-list.ts';
import type { FileRange } from './write.ts';

const encoder = new TextEncoder();
const CHUNK = 1 << 20;

/**
 * A value already written: the bytes this module writes for it at the
 * indentation `indent` (kept from an earlier build), read when they are
 * reached and put into the document as they are (copied or handed on at
 * once: the reader may reuse its buffer for the next). Only valid where
 * the value would be written at `indent`.
 */
export class WrittenJson {
  constructor(
    readonly bytes: () => Uint8Array,
    readonly indent: string,
    /** Where the bytes are, for a writer that copies them from there itself (jsonChunks' `copy`): never read here then. */
    readonly from?: FileRange,
  ) {}
}

/** A value whose bytes are wanted back: `at` hears where they begin and end in the document (byte offsets). */
export class MarkedJson {
  constructor(
    readonly value: unknown,
    readonly at: (start: number, end: number) => void,
  ) {}
}

/** What the writer is handed: text to encode, bytes as they are, or a point whose byte offset is wanted. */
type Piece = string | WrittenJson | { readonly here: (offset: number) => void };

/** Counts the nodes of `value`, stopping at `limit`; `limit` too when it holds one of `keys`. */
function nodesUpTo(value: unknown, limit: number, keys?: ReadonlySet<string>): number {
  let n = 0;
  const walk = (v: unknown): void => {
    n++;
    if (n >= limit || v === null || typeof v !== 'object') return;
    // Bytes already written, or a value to mark, are never handed to JSON.stringify.
    if (v instanceof WrittenJson || v instanceof MarkedJson) {
      n = limit;
      return;
    }
    if (v instanceof LazyList) {
      // Not made here: its items count as one node each.
      n += v.length;
      return;
    }
    if (Array.isArray(v)) {
      for (const x of v) {
        walk(x);
        if (n >= limit) return;
      }
    } else {
      for (const k in v) {
        if (keys?.has(k)) {
          n = limit;
          return;
        }
        walk((v as Record<string, unknown>)[k]);
        if (n >= limit) return;
      }
    }
  };
  walk(value);
  return n;
}

/** Below this many nodes a value is handed to JSON.stringify whole: far faster, and far from the longest string. */
const SMALL = 4096;
/** The same for a whole document made at once (jsonBytes): a few tens of megabytes of text at most. */
const WHOLE = 1 << 20;

export interface JsonLayout {
  /** Arrays under these keys get one line per item (the item itself unindented), not one line per field. */
  readonly itemPerLine?: ReadonlySet<string>;
}

function* pieces(value: unknown, indent: string, layout: JsonLayout = {}, key?: string): Generator<Piece> {
  if (value instanceof WrittenJson) {
    if (value.indent !== indent) throw new Error(`internal: JSON written at indent ${value.indent.length} put at indent ${indent.length}`);
    return yield value;
  }
  if (value instanceof MarkedJson) {
    let start = 0;
    yield { here: (offset) => (start = offset) };
    yield* pieces(value.value, indent, layout, key);
    return yield { here: (end) => value.at(start, end) };
  }
  if (key !== undefined && layout.itemPerLine?.has(key) && (Array.isArray(value) || value instanceof LazyList)) {
    const list = value as { readonly length: number; at(i: number): unknown };
    if (list.length === 0) return yield '[]';
    const inner = `${indent}  `;
    yield '[\n';
    for (let i = 0; i < list.length; i++) yield `${inner}${JSON.stringify(list.at(i) ?? null) ?? 'null'}${i < list.length - 1 ? ',\n' : '\n'}`;
    return yield `${indent}]`;
  }
  // A LazyList anywhere else is written as the array it stands for.
  if (value instanceof LazyList) return yield* pieces(value.toJSON(), indent, layout, key);
  if (value !== null && typeof value === 'object' && nodesUpTo(value, SMALL, layout.itemPerLine) < SMALL) {
    const text = JSON.stringify(value, null, 2);
    // Every line end in JSON.stringify's output is structural (strings escape theirs), so re-indenting is exact.
    return yield indent === '' ? text : text.replaceAll('\n', `\n${indent}`);
  }
  if (Array.isArray(value)) {
    if (value.length === 0) return yield '[]';
    const inner = `${indent}  `;
    yield '[\n';
    for (let i = 0; i < value.length; i++) {
      yield inner;
      const v = value[i];
      // As JSON.stringify does: undefined and functions in an array are null.
      if (v === undefined || typeof v === 'function') yield 'null';
      else yield* pieces(v, inner, layout);
      yield i < value.length - 1 ? ',\n' : '\n';
    }
    return yield `${indent}]`;
  }
  if (value !== null && typeof value === 'object' && typeof (value as { toJSON?: unknown }).toJSON !== 'function') {
    const entries = Object.entries(value).filter(([, v]) => v !== undefined && typeof v !== 'function');
    if (entries.length === 0) return yield '{}';
    const inner = `${indent}  `;
    yield '{\n';
    for (let i = 0; i < entries.length; i++) {
      const [k, v] = entries[i]!;
      yield `${inner}${JSON.stringify(k)}: `;
      yield* pieces(v, inner, layout, k);
      yield i < entries.length - 1 ? ',\n' : '\n';
    }
    return yield `${indent}}`;
  }
  yield JSON.stringify(value) ?? 'null';
}

/**
 * The pretty-printed JSON of `value` with a final line end, as UTF-8 bytes.
 * With `layout.itemPerLine`, the arrays under those keys are written one
 * item to a line: the same JSON value, a third of the bytes for summary.json's
 * points, and one line per point in a diff.
 */
export function jsonBytes(value: unknown, layout: JsonLayout = {}): Uint8Array {
  // A document of plain values and not too many of them (record.json, manifest.json) is handed to
  // JSON.stringify whole: a plant's record.json (2.3 MB) took 40–120 ms piece by piece, 12–20 ms so.
  if (nodesUpTo(value, WHOLE, layout.itemPerLine) < WHOLE) return whole(value) ?? piecewise(value, layout);
  return piecewise(value, layout);
}

/** JSON.stringify(value, null, 2) + "\n" as UTF-8; undefined where the text would be too long for one string. */
function whole(value: unknown): Uint8Array | undefined {
  try {
    return encoder.encode(`${JSON.stringify(value, null, 2) ?? 'null'}\n`);
  } catch (e) {
    if (e instanceof RangeError) return undefined;
    throw e;
  }
}

function piecewise(value: unknown, layout: JsonLayout): Uint8Array {
  const out = new GrowingBytes();
  documentChunks(value, layout, CHUNK, out);
  return out.result();
}

/**
 * jsonBytes of a document known to hold only plain objects, arrays and
 * primitives (record.json): handed to JSON.stringify whole without
 * counting its nodes first (12 ms of a plant's rebuild); written piece by
 * piece only if it is too long for one string.
 */
export function plainJsonBytes(value: unknown): Uint8Array {
  return whole(value) ?? piecewise(value, {});
}

/** Where the document goes: text to encode, bytes to copy, and how many bytes it holds so far. */
interface ByteWriter {
  text(text: string): void;
  bytes(bytes: WrittenJson): void;
  offset(): number;
}

/** The document, handed on as text in chunks of at least `chunk` characters (the last one shorter) and bytes already written. */
function documentChunks(value: unknown, layout: JsonLayout, chunk: number, out: ByteWriter): void {
  let buffer = '';
  const flush = () => {
    if (buffer !== '') out.text(buffer);
    buffer = '';
  };
  for (const p of pieces(value, '', layout)) {
    if (typeof p === 'string') {
      buffer += p;
      if (buffer.length >= chunk) flush();
    } else if (p instanceof WrittenJson) {
      flush();
      out.bytes(p);
    } else {
      flush();
      p.here(out.offset());
    }
  }
  out.text(`${buffer}\n`);
}

/**
 * The bytes jsonBytes would give, handed to `sink` a piece at a time
 * through one buffer that is reused: for a file written as it is made, so
 * that none of it is held. Each piece is only valid until `sink` returns.
 * With `copy`, a written value that says where its bytes are is handed to
 * it instead, unread.
 */
export function jsonChunks(value: unknown, layout: JsonLayout, sink: (bytes: Uint8Array) => void, chunk = CHUNK, copy?: (from: FileRange) => void): void {
  // UTF-8 takes at most three bytes per UTF-16 unit; a longer text is encoded in turns.
  const buffer = new Uint8Array(chunk * 3);
  let total = 0;
  documentChunks(value, layout, chunk, {
    text(text) {
      for (let rest = text; rest.length > 0; ) {
        // encodeInto never splits a surrogate pair, so each turn is whole UTF-8.
        const { read, written } = encoder.encodeInto(rest, buffer);
        if (read === 0) throw new RangeError(`jsonChunks: a chunk of ${chunk} characters cannot hold one`);
        sink(buffer.subarray(0, written));
        total += written;
        rest = rest.slice(read);
      }
    },
    bytes(written) {
      if (copy && written.from) {
        copy(written.from);
        total += written.from.end - written.from.start;
        return;
      }
      const bytes = written.bytes();
      sink(bytes);
      total += bytes.length;
    },
    offset: () => total,
  });
}

/**
 * Bytes written in pieces into one resizable ArrayBuffer, which grows in
 * place: gathering the pieces and joining them at the end held the
 * document twice, and a million-point summary.json is 436 MB.
 */
class GrowingBytes implements ByteWriter {
  /** The most a document may take; only what is written is ever committed. */
  private static readonly MAX = 2 ** 32;
  private readonly buffer = new ArrayBuffer(0, { maxByteLength: GrowingBytes.MAX });
  private length = 0;

  private room(need: number): void {
    if (need > this.buffer.byteLength) this.buffer.resize(Math.min(GrowingBytes.MAX, Math.max(need, this.buffer.byteLength * 1.25)));
  }

  text(text: string): void {
    // UTF-8 takes at most three bytes per UTF-16 unit.
    this.room(this.length + text.length * 3);
    const { read, written } = encoder.encodeInto(text, new Uint8Array(this.buffer, this.length));
    if (read < text.length) throw new RangeError(`a JSON document over ${GrowingBytes.MAX} bytes`);
    this.length += written;
  }

  bytes(written: WrittenJson): void {
    const bytes = written.bytes();
    if (this.length + bytes.length > GrowingBytes.MAX) throw new RangeError(`a JSON document over ${GrowingBytes.MAX} bytes`);
    this.room(this.length + bytes.length);
    new Uint8Array(this.buffer, this.length, bytes.length).set(bytes);
    this.length += bytes.length;
  }

  offset(): number {
    return this.length;
  }

  result(): Uint8Array {
    this.buffer.resize(this.length);
    return new Uint8Array(this.buffer, 0, this.length);
  }
}
