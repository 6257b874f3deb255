/** jsonBytes writes exactly what JSON.stringify(value, null, 2) + "\n" would, without building one string. */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it, vi } from 'vitest';
import { LazyList } from '../../src/lazy-list.ts';
import { MarkedJson, WrittenJson, jsonBytes, jsonChunks, plainJsonBytes } from '../../src/pack/json-bytes.ts';

const reference = (v: unknown) => `${JSON.stringify(v, null, 2)}\n`;
const decode = (b: Uint8Array) => new TextDecoder().decode(b);

describe('jsonBytes', () => {
  it('matches JSON.stringify on awkward values', () => {
    for (const v of [
      null, 0, -0, 1e21, NaN, Infinity, 'a"b\\c\n\u2028é😀', [], {}, [[]], [{}], { a: undefined, b: () => 1, c: [undefined, () => 1, null] },
      { nested: { deep: [1, [2, [3, { x: 'y' }]]] }, empty: { a: [], b: {} } }, [1, 'two', false, null, { three: 3 }],
    ]) expect(decode(jsonBytes(v))).toBe(reference(v));
  });
  it('matches JSON.stringify on the demo schema files', () => {
    for (const f of ['schemas/summary.schema.json', 'schemas/review.schema.json']) {
      const v = JSON.parse(readFileSync(path.join(import.meta.dirname, '../..', f), 'utf8'));
      expect(decode(jsonBytes(v))).toBe(reference(v));
    }
  });
  it('writes a document larger than a chunk in pieces that join up exactly, re-indenting the parts it stringifies whole', () => {
    const big = { points: Array.from({ length: 40_000 }, (_, i) => ({ label: `p${i}\n\u2028`, value: i / 7, signals: i % 3 ? [] : ['beyond-limits'] })) };
    expect(decode(jsonBytes(big))).toBe(reference(big));
    // jsonBytes hands a plain document this size to JSON.stringify whole; jsonChunks still writes it piece by piece.
    const parts: Uint8Array[] = [];
    jsonChunks(big, {}, (b) => parts.push(b.slice()));
    expect(decode(Buffer.concat(parts))).toBe(reference(big));
  });
});

describe('jsonBytes with one item per line', () => {
  const layout = { itemPerLine: new Set(['points']) };
  it('writes the same JSON value, each listed array one item to a line, everything else as JSON.stringify(v, null, 2)', () => {
    const value = {
      format: 1,
      characteristics: Array.from({ length: 3 }, (_, c) => ({
        id: `c${c}`,
        points: Array.from({ length: 3000 }, (_, i) => ({ label: `p${i}\n`, value: i / 7, signals: i % 3 ? [] : ['beyond-limits'], skip: undefined })),
        dispersion: { points: [{ a: 1 }, null, 'x'] },
        small: { points: [] },
        baselines: [{ start: 'p0', limits: { center: 1 } }],
      })),
    };
    const text = decode(jsonBytes(value, layout));
    expect(JSON.parse(text)).toEqual(JSON.parse(JSON.stringify(value)));
    const lines = text.split('\n');
    // Every point is one line: 3 characteristics × 3,000 points, written as JSON.stringify writes one item.
    expect(lines.filter((l) => l.startsWith('        {"label":'))).toHaveLength(9000);
    expect(text).toContain(`        ${JSON.stringify({ label: 'p1\n', value: 1 / 7, signals: [] })},\n`);
    expect(text).toContain('"points": [\n          {"a":1},\n          null,\n          "x"\n        ]');
    expect(text).toContain('"small": {\n        "points": []\n      }');
    // The rest is laid out as JSON.stringify with two spaces.
    expect(text.startsWith('{\n  "format": 1,\n  "characteristics": [\n    {\n      "id": "c0",\n      "points": [\n')).toBe(true);
    expect(text).toContain(JSON.stringify([{ start: 'p0', limits: { center: 1 } }], null, 2).replaceAll('\n', '\n      '));
  });
});

describe('jsonBytes with lists made on demand (LazyList)', () => {
  const lazy = <T>(items: readonly T[]) => new LazyList(items.length, (i) => items[i]!);
  const layout = { itemPerLine: new Set(['points']) };
  const plain = {
    format: 1,
    characteristics: Array.from({ length: 2 }, (_, c) => ({
      id: `c${c}`,
      points: Array.from({ length: 5000 }, (_, i) => ({ label: `p${i}`, value: i / 3, signals: i % 4 ? [] : ['run'] })),
      dispersion: { points: Array.from({ length: 40 }, (_, i) => ({ value: i })) },
      small: { points: [{ a: 1 }], other: [1, 2] },
    })),
  };
  const withLazy = {
    ...plain,
    characteristics: plain.characteristics.map((c) => ({ ...c, points: lazy(c.points), dispersion: { points: lazy(c.dispersion.points) }, small: { points: lazy(c.small.points), other: lazy(c.small.other) } })),
  };
  it('writes the bytes the arrays would give, with one item per line and without', () => {
    // The reference is the plain arrays through jsonBytes (itself checked against JSON.stringify above) and JSON.stringify.
    expect(decode(jsonBytes(withLazy, layout))).toBe(decode(jsonBytes(plain, layout)));
    expect(decode(jsonBytes(withLazy))).toBe(reference(plain));
    expect(JSON.stringify(withLazy)).toBe(JSON.stringify(plain));
  });
  it('makes each item only when it is written, and reads by position like an array', () => {
    let made = 0;
    const list = new LazyList(3, (i) => (made++, { i }));
    expect(made).toBe(0);
    expect(list.at(-1)).toEqual({ i: 2 });
    expect(list.at(3)).toBeUndefined();
    expect(list.at(-4)).toBeUndefined();
    expect(decode(jsonBytes({ points: list }, layout))).toBe('{\n  "points": [\n    {"i":0},\n    {"i":1},\n    {"i":2}\n  ]\n}\n');
    expect(made).toBe(4);
  });
});

describe('jsonChunks: the same bytes, a reused buffer at a time', () => {
  const gather = (value: unknown, layout: { itemPerLine?: ReadonlySet<string> }, chunk?: number) => {
    const parts: Uint8Array[] = [];
    jsonChunks(value, layout, (b) => parts.push(b.slice()), chunk);
    return Buffer.concat(parts);
  };
  it('writes what jsonBytes writes, at any chunk size, astral characters included', () => {
    const value = {
      title: 'a"b\\c\n\u2028é😀'.repeat(40),
      points: new LazyList(2000, (i) => ({ label: `p${i}😀`, value: i / 7, signals: i % 5 ? [] : ['run'] })),
      nested: { deep: [1, [2, [3, { x: '😀😀😀' }]]] },
    };
    const layout = { itemPerLine: new Set(['points']) };
    const expected = Buffer.from(jsonBytes(value, layout));
    for (const chunk of [2, 3, 7, 64, 1000, 1 << 20]) expect(gather(value, layout, chunk).equals(expected), `chunk ${chunk}`).toBe(true);
    expect(gather([], {}).toString()).toBe('[]\n');
  });
  it('hands on pieces no longer than three bytes a character of its chunk', () => {
    const sizes: number[] = [];
    jsonChunks({ s: 'é'.repeat(10_000) }, {}, (b) => sizes.push(b.length), 100);
    expect(Math.max(...sizes)).toBeLessThanOrEqual(300);
    expect(sizes.reduce((a, b) => a + b, 0)).toBe(jsonBytes({ s: 'é'.repeat(10_000) }).length);
  });
});

describe('bytes kept from an earlier document (MarkedJson, WrittenJson)', () => {
  // A summary-like document: its characteristics are marked, their bytes taken from the output, and a
  // second document made with some of them as written bytes must be the first one's bytes again.
  // The reference is JSON.stringify (the unmarked values), and JSON.parse of each marked slice.
  const items = Array.from({ length: 60 }, (_, i) => ({
    id: `k${i}-é😀`,
    points: Array.from({ length: (i * 37) % 90 }, (_, j) => ({ x: j / 3, label: `p${j}\u2028"` })),
    notes: i % 4 ? [] : [{ text: 'a\nb' }],
  }));
  const layout = { itemPerLine: new Set(['points']) };
  const plain = { format: 1, characteristics: items };
  const marked = (ranges: [number, number][]) => ({ format: 1, characteristics: items.map((v, i) => new MarkedJson(v, (s, e) => (ranges[i] = [s, e]))) });
  const gather = (value: unknown, chunk?: number) => {
    const parts: Uint8Array[] = [];
    jsonChunks(value, layout, (b) => parts.push(b.slice()), chunk);
    return new Uint8Array(Buffer.concat(parts));
  };

  it('marks where each value was written, in both writers, without changing a byte', () => {
    for (const write of [(v: unknown) => jsonBytes(v, layout), (v: unknown) => gather(v, 64)]) {
      const ranges: [number, number][] = [];
      const bytes = write(marked(ranges));
      expect(decode(bytes)).toBe(decode(jsonBytes(plain, layout)));
      expect(ranges).toHaveLength(items.length);
      ranges.forEach(([s, e], i) => expect(JSON.parse(decode(bytes.subarray(s, e)))).toEqual(items[i]));
      // Each value starts a line, after the array's indentation of four spaces.
      for (const [s] of ranges) expect(decode(bytes.subarray(s - 5, s))).toBe('\n    ');
    }
  });

  it('puts written bytes back where they were taken from, for any subset, in both writers', () => {
    const ranges: [number, number][] = [];
    const first = jsonBytes(marked(ranges), layout);
    for (const keep of [() => true, (i: number) => i % 3 === 0, (i: number) => i === 59]) {
      const again = { format: 1, characteristics: items.map((v, i) => (keep(i) ? new WrittenJson(() => first.slice(ranges[i]![0], ranges[i]![1]), '    ') : v)) };
      expect(Buffer.from(jsonBytes(again, layout)).equals(Buffer.from(first))).toBe(true);
      for (const chunk of [7, 1000]) expect(Buffer.from(gather(again, chunk)).equals(Buffer.from(first))).toBe(true);
    }
    // Even where the whole would be small enough for JSON.stringify: written bytes are never stringified.
    const one = { characteristics: [new WrittenJson(() => new TextEncoder().encode('{"a": 1}'), '    ')] };
    expect(decode(jsonBytes(one))).toBe('{\n  "characteristics": [\n    {"a": 1}\n  ]\n}\n');
  });

  it('refuses written bytes put at another indentation', () => {
    expect(() => jsonBytes([new WrittenJson(() => new Uint8Array([0x31]), '    ')])).toThrow(/indent/);
  });
});

describe('plainJsonBytes (record.json)', () => {
  const record = { format: 1, asOf: '2026-11-30', period: { from: '2026-11-01', to: '2026-11-30' }, characteristics: [{ id: 'a', name: 'Fill — ±0.1 😀', points: [], signals: [{ rule: 'r1', points: [1, 2] }], recommendation: null }] };
  it('writes what JSON.stringify(value, null, 2) + "\\n" does', () => {
    expect(decode(plainJsonBytes(record))).toBe(reference(record));
    expect(decode(plainJsonBytes([]))).toBe('[]\n');
  });
  it('writes piece by piece a document too long for one string (JSON.stringify\'s RangeError), the same bytes, as jsonBytes does', () => {
    // The whole document's JSON.stringify fails as V8's does past its longest string; the pieces' calls do not.
    // A record of more nodes than one piece, so that the pieces are its items.
    const many = { ...record, characteristics: Array.from({ length: 1500 }, (_, i) => ({ ...record.characteristics[0]!, id: `c${i}` })) };
    const big = { points: Array.from({ length: 5000 }, (_, i) => ({ label: `p${i}`, value: i / 7 })) };
    const real = JSON.stringify;
    const spy = vi.spyOn(JSON, 'stringify').mockImplementation((v: unknown, ...rest: unknown[]) => {
      if (v === many || v === big) throw new RangeError('Invalid string length');
      return real(v, ...(rest as [])) as string;
    });
    try {
      expect(decode(plainJsonBytes(many))).toBe(real(many, null, 2) + '\n');
      // jsonBytes likewise, where it would hand the document whole.
      expect(decode(jsonBytes(big))).toBe(real(big, null, 2) + '\n');
      expect(spy).toHaveBeenCalled();
    } finally {
      spy.mockRestore();
    }
  });
});
