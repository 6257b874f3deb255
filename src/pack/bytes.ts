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
