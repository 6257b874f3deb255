/** jsonBytes writes exactly what JSON.stringify(value, null, 2) + "\n" would, without building one string. */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { jsonBytes } from '../../src/pack/json-bytes.ts';

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
  });
});
