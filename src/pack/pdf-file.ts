/**
 * A PDF file written object by object (ISO 32000-1 §7.5: header, indirect
 * objects, cross-reference table, trailer), for joining laid-out pages:
 * the pages' content streams come already compressed (from the layout or
 * the build cache) and every other object is a short dictionary, so they
 * are written as text straight away. Building them as pdf-lib objects and
 * serialising those took 0.6 s of a plant's rebuild (2,194 pages, 4,000
 * links), most of it objects made and collected. Pure.
 */
import { decimalText } from '../format.ts';

/** An indirect object's reference, as written: `12 0 R`. */
export const ref = (n: number) => `${n} 0 R`;

/** A PDF name (§7.3.5): a character outside printable ASCII, or a delimiter, is written #xx. */
export const name = (s: string) =>
  `/${[...Buffer.from(s, 'utf8')].map((b) => (b > 0x20 && b < 0x7f && !'#()<>[]{}/%'.includes(String.fromCharCode(b)) ? String.fromCharCode(b) : `#${b.toString(16).padStart(2, '0').toUpperCase()}`)).join('')}`;

/** A number with at most three decimals, no exponent, no "-0" (as the pages' content streams write them). */
export function num(v: number): string {
  if (!Number.isFinite(v)) throw new Error(`internal: non-finite PDF number ${v}`);
  return decimalText(v, 3);
}

/** An array of written values. */
export const array = (items: readonly string[]) => `[ ${items.join(' ')} ]`;

/** A dictionary of written values; undefined values are left out. */
export function dict(entries: Readonly<Record<string, string | undefined>>): string {
  let out = '<<';
  for (const key in entries) {
    const v = entries[key];
    if (v !== undefined) out += `\n/${key} ${v}`;
  }
  return `${out}\n>>`;
}

/** A literal string of printable ASCII, escaped (§7.3.4.2). */
export const asciiString = (s: string) => `(${s.replace(/[\\()]/g, (c) => `\\${c}`)})`;

/** A text string of any characters, as UTF-16BE with its byte-order mark, in hex (§7.9.2.2). */
export function textString(s: string): string {
  let hex = 'FEFF';
  for (let i = 0; i < s.length; i++) hex += s.charCodeAt(i).toString(16).padStart(4, '0').toUpperCase();
  return `<${hex}>`;
}

/** A date (§7.9.4), in UTC. */
export function dateString(d: Date): string {
  const p = (n: number, w = 2) => String(n).padStart(w, '0');
  return `(D:${p(d.getUTCFullYear(), 4)}${p(d.getUTCMonth() + 1)}${p(d.getUTCDate())}${p(d.getUTCHours())}${p(d.getUTCMinutes())}${p(d.getUTCSeconds())}Z)`;
}

const latin1 = (s: string) => Buffer.from(s, 'latin1');

export class PdfFile {
  private readonly chunks: Uint8Array[] = [];
  /** Text not yet made bytes: objects' text is gathered and encoded in runs. */
  private pending = '';
  private length = 0;
  /** Byte offset of each object, by number (0 is the free head of the table). */
  private readonly offsets: number[] = [0];

  constructor() {
    // A comment of four bytes above 127 after the header marks the file as binary (§7.5.2).
    this.text('%PDF-1.7\n');
    this.bytes(new Uint8Array([0x25, 0x81, 0x81, 0x81, 0x81, 0x0a, 0x0a]));
  }

  /** A new object number, for an object written later (or referred to before it is). */
  reserve(): number {
    this.offsets.push(-1);
    return this.offsets.length - 1;
  }

  /** Writes object `n` (reserved) with `body`, a written value. */
  put(n: number, body: string): number {
    this.offsets[n] = this.length + this.pending.length;
    this.text(`${n} 0 obj\n${body}\nendobj\n\n`);
    return n;
  }

  /** A new object with `body`. */
  add(body: string): number {
    return this.put(this.reserve(), body);
  }

  /** A new stream object: `entries` (its Length is added) and its bytes as they are to be stored. */
  stream(entries: Readonly<Record<string, string | undefined>>, bytes: Uint8Array, n = this.reserve()): number {
    this.offsets[n] = this.length + this.pending.length;
    this.text(`${n} 0 obj\n${dict({ ...entries, Length: String(bytes.length) })}\nstream\n`);
    this.bytes(bytes);
    this.text('\nendstream\nendobj\n\n');
    return n;
  }

  /** The file, with its cross-reference table and trailer (`root`, the catalog; `info`, the document information). */
  finish(root: number, info: number): Uint8Array {
    return Buffer.concat(this.finishInPieces(root, info));
  }

  /** The file as `finish` gives it, in the pieces it was gathered in: a writer takes them as they are, without joining ten megabytes first. */
  finishInPieces(root: number, info: number): readonly Uint8Array[] {
    const missing = this.offsets.findIndex((o, i) => i > 0 && o < 0);
    if (missing > 0) throw new Error(`internal: PDF object ${missing} was reserved but never written`);
    const xref = this.length + this.pending.length;
    let table = `xref\n0 ${this.offsets.length}\n0000000000 65535 f \n`;
    for (let i = 1; i < this.offsets.length; i++) table += `${String(this.offsets[i]).padStart(10, '0')} 00000 n \n`;
    this.text(`${table}\ntrailer\n${dict({ Size: String(this.offsets.length), Root: ref(root), Info: ref(info) })}\n\nstartxref\n${xref}\n%%EOF`);
    this.flush();
    return this.chunks;
  }

  private text(s: string): void {
    this.pending += s;
    if (this.pending.length > 1 << 16) this.flush();
  }

  private bytes(b: Uint8Array): void {
    this.flush();
    this.chunks.push(b);
    this.length += b.length;
  }

  private flush(): void {
    if (!this.pending) return;
    const b = latin1(this.pending);
    this.chunks.push(b);
    this.length += b.length;
    this.pending = '';
  }
}
