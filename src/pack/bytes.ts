/** Byte arrays joined for the pack's files. */

/** The chunks one after another, in a buffer of their own (moved whole to another thread, never a pool's). */
export function concatBytes(chunks: readonly Uint8Array[]): Uint8Array {
  let length = 0;
  for (const c of chunks) length += c.length;
  const out = new Uint8Array(length);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.length;
  }
  return out;
}

/** Bytes `start` to `end` (exclusive) of `file`. */
export interface FileRange {
  readonly file: string;
  readonly start: number;
  readonly end: number;
}

/**
 * Where a document's bytes go as they are made: written, or copied from
 * a range of a file an earlier build wrote (a rebuild's index.html is
 * nearly all the previous one's parts).
 */
export interface ByteSink {
  write(bytes: Uint8Array): void;
  copy(from: FileRange): void;
  /** Bytes taken so far. */
  readonly length: number;
}

/** A sink that holds the bytes; a range is read at once (`read` gives a file's range). */
export function memorySink(read: (from: FileRange) => Uint8Array): ByteSink & { bytes(): Uint8Array } {
  const chunks: Uint8Array[] = [];
  let length = 0;
  return {
    write(bytes) {
      chunks.push(bytes);
      length += bytes.length;
    },
    copy(from) {
      const bytes = read(from);
      chunks.push(bytes);
      length += bytes.length;
    },
    get length() {
      return length;
    },
    bytes: () => concatBytes(chunks),
  };
}
