/**
 * The two number formatters: one for people (tables, labels) and one for
 * geometry (SVG and PDF path data). Both are deterministic and never write
 * an exponent, so outputs are byte-stable and pdf-lib's path parser, which
 * only knows spaces and commas as separators, always reads them.
 */

/** A value for a reader: fixed decimals, a true minus sign avoided (ASCII '-') so text stays searchable. */
export function fmt(value: number | null | undefined, decimals: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '–';
  const s = value.toFixed(decimals);
  // -0.00 reads as a sign error.
  return /^-0(\.0+)?$/.test(s) ? s.slice(1) : s;
}

/** Decimals that show a value with about `significant` significant digits, capped to keep tables tidy. */
export function decimalsFor(magnitude: number, significant = 4): number {
  if (!Number.isFinite(magnitude) || magnitude === 0) return 2;
  const digits = Math.floor(Math.log10(Math.abs(magnitude))) + 1;
  return Math.max(0, Math.min(6, significant - digits));
}

/**
 * `value` rounded to `places` decimals, written as toFixed writes it less
 * trailing zeros, never "-0" or an exponent. The rounding is Math.round of
 * value × 10^places, an integer k; while |k| < 2^50 its digits are written
 * with integer arithmetic (exact for integers this size), a point put
 * `places` digits from the right. PDF and SVG path data write millions of
 * these on a plant, and String() of the rounded double, which gives the
 * same text, took half a second of a PDF stage. toFixed, exact but slow,
 * takes the rare larger values.
 */
export function decimalText(value: number, places: number): string {
  const scale = 10 ** places;
  const k = Math.round(value * scale);
  if (k === 0) return '0';
  const a = k < 0 ? -k : k;
  if (a < 2 ** 50) {
    const frac = a % scale;
    const whole = (a - frac) / scale;
    const sign = k < 0 ? '-' : '';
    if (frac === 0) return `${sign}${whole}`;
    let digits = String(frac);
    while (digits.length < places) digits = `0${digits}`;
    let end = digits.length;
    while (digits.charCodeAt(end - 1) === 48) end--;
    return `${sign}${whole}.${end === digits.length ? digits : digits.slice(0, end)}`;
  }
  const s = (k / scale).toFixed(places).replace(/\.?0+$/, '');
  return s === '-0' ? '0' : s;
}

/** A coordinate in points, two decimals, no trailing zeros, no exponent. */
export function geom(value: number): string {
  if (!Number.isFinite(value)) throw new Error(`internal: non-finite coordinate ${value}`);
  return decimalText(value, 2);
}

/** A percentage for a reader, e.g. 0.0123 → "1.23%". */
export function pct(fraction: number, decimals = 2): string {
  return `${fmt(fraction * 100, decimals)}%`;
}

/**
 * Text with the control characters removed (tab and line breaks become
 * spaces): XML forbids most of them, PDF text operators would carry them
 * literally, and none of them means anything in a label or a table cell.
 */
export function printable(s: string): string {
  return s.replace(/[\t\n\r]/g, ' ').replace(/[\u0000-\u001f\u007f-\u009f]/g, '');
}

/** A value for a sentence, with about four significant digits. */
export function fmtAuto(value: number): string {
  return fmt(value, decimalsFor(value));
}

/** "1 point", "3 points"; `many` for irregular plurals. */
export function plural(n: number, word: string, many = `${word}s`): string {
  return `${n} ${n === 1 ? word : many}`;
}

/** A 2-decimal coordinate for compact path data: no leading zero, no trailing zeros ("0.50" → ".5", "-0.5" → "-.5"). */
export function tight(value: number): string {
  const s = geom(value);
  return s.startsWith('0.') ? s.slice(1) : s.startsWith('-0.') ? `-${s.slice(2)}` : s;
}

/**
 * Scene path data (absolute M, L, Q, C, Z, numbers two decimals apart at most)
 * rewritten for an SVG file: relative moves after the first, numbers
 * without padding, a space only where a number would otherwise run into
 * the last. A chart of a thousand points is mostly its data line, and this
 * halves it. Each relative step is the difference of the rounded absolute
 * coordinates, so the points are exactly those of `d` rounded to 0.01 —
 * no drift along the line. Other path data is returned as it came. With
 * `fillOnly` (glyph outlines, which are filled, never stroked), lines of
 * length zero are left out.
 */
export function compactPath(d: string, options: { readonly fillOnly?: boolean } = {}): string {
  const tokens = d.match(/[MLQCZ]|-?\d*\.?\d+/g);
  if (!tokens || /[^MLQCZ\d\s.,-]/.test(d)) return d;
  const r2 = (v: number) => Math.round(v * 100) / 100;
  // Parts joined once, and whether the last part was a number kept aside: testing the end of a
  // growing string flattened it at every step, copying a long data line over and over.
  const out: string[] = [];
  let afterNumber = false;
  let cx = 0;
  let cy = 0;
  let sx = 0;
  let sy = 0;
  let first = true;
  let i = 0;
  let last = '';
  const num = (v: number) => {
    const s = tight(v);
    // A space only between two numbers that would otherwise merge.
    out.push(afterNumber && !s.startsWith('-') ? ` ${s}` : s);
    afterNumber = true;
  };
  const read = () => r2(Number(tokens[i++]));
  while (i < tokens.length) {
    const cmd = tokens[i++]!;
    if (cmd === 'Z') {
      out.push('z');
      afterNumber = false;
      cx = sx;
      cy = sy;
      last = 'z';
      continue;
    }
    const pairs = cmd === 'C' ? 3 : cmd === 'Q' ? 2 : 1;
    if (cmd !== 'M' && cmd !== 'L' && cmd !== 'Q' && cmd !== 'C') return d;
    const xs: number[] = [];
    for (let k = 0; k < pairs; k++) {
      const x = read();
      const y = read();
      if (!Number.isFinite(x) || !Number.isFinite(y)) return d;
      xs.push(x, y);
    }
    // A line to where the pen already is draws nothing in a filled outline (satori writes many).
    if (options.fillOnly && cmd === 'L' && xs[0] === cx && xs[1] === cy) continue;
    if (cmd === 'M' && first) {
      out.push('M');
      afterNumber = false;
      num(xs[0]!);
      num(xs[1]!);
      last = 'M';
    } else {
      const letter = cmd.toLowerCase();
      // A repeated command letter may be left out (SVG path grammar); m would turn into l, so moves always name theirs.
      if (letter !== last || letter === 'm') {
        out.push(letter);
        afterNumber = false;
      }
      for (let k = 0; k < xs.length; k += 2) {
        num(r2(xs[k]! - cx));
        num(r2(xs[k + 1]! - cy));
      }
      last = letter;
    }
    first = false;
    cx = xs[xs.length - 2]!;
    cy = xs[xs.length - 1]!;
    if (cmd === 'M') {
      sx = cx;
      sy = cy;
    }
  }
  return out.join('');
}

/** A whole number of tenths as `tight` writes the value: 5 → ".5", -12 → "-1.2", 30 → "3". */
function tenthsText(n: number): string {
  const a = n < 0 ? -n : n;
  const whole = Math.floor(a / 10);
  const tenth = a - whole * 10;
  const s = tenth === 0 ? String(whole) : whole === 0 ? `.${tenth}` : `${whole}.${tenth}`;
  return n < 0 ? `-${s}` : s;
}

/**
 * `compactPath(d, { fillOnly: true })` for a path whose coordinates are all
 * whole tenths, given as its commands (M, L, Q, C, Z) and its coordinates in
 * tenths (x, y pairs): the same text, without writing the absolute path and
 * reading it back. Glyph outlines are laid out this way thousands of times.
 */
export function compactTenths(commands: string, coords: ArrayLike<number>): string {
  // Parts joined once: a string grown by += is a rope of one node per piece, about 25 times
  // the size of its text, and label paths are kept for the whole build (172 MB at 1,000 charts).
  const out: string[] = [];
  let cx = 0;
  let cy = 0;
  let sx = 0;
  let sy = 0;
  let at = 0;
  let last = '';
  let first = true;
  let afterNumber = false;
  const num = (n: number) => {
    const s = tenthsText(n);
    out.push(afterNumber && n >= 0 ? ` ${s}` : s);
    afterNumber = true;
  };
  for (let i = 0; i < commands.length; i++) {
    const cmd = commands[i]!;
    if (cmd === 'Z') {
      out.push('z');
      cx = sx;
      cy = sy;
      last = 'z';
      afterNumber = false;
      continue;
    }
    const pairs = cmd === 'C' ? 3 : cmd === 'Q' ? 2 : 1;
    const from = at;
    at += 2 * pairs;
    const ex = coords[at - 2]!;
    const ey = coords[at - 1]!;
    if (cmd === 'L' && ex === cx && ey === cy) continue;
    if (cmd === 'M' && first) {
      out.push('M');
      afterNumber = false;
      num(ex);
      num(ey);
      last = 'M';
    } else {
      const letter = cmd.toLowerCase();
      if (letter !== last || letter === 'm') {
        out.push(letter);
        afterNumber = false;
      }
      for (let k = from; k < at; k += 2) {
        num(coords[k]! - cx);
        num(coords[k + 1]! - cy);
      }
      last = letter;
    }
    first = false;
    cx = ex;
    cy = ey;
    if (cmd === 'M') {
      sx = cx;
      sy = cy;
    }
  }
  return out.join('');
}
