/**
 * compactPath rewrites absolute path data as relative steps: read back by
 * an independent reader of the SVG path grammar (written here from the
 * SVG 1.1 specification, section 8.3: implicit repetition of a command,
 * relative coordinates, closepath returning to the subpath's start), it
 * must give the original points rounded to 0.01, with no drift.
 */
import { getHeapStatistics, setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compactPath, compactTenths } from '../../src/format.ts';
import { absolutePoints } from '../helpers/svg-path.ts';

const coord = fc.integer({ min: -100_000, max: 100_000 }).map((n) => n / 100);
const pair = fc.tuple(coord, coord);
const segment = fc.oneof(
  pair.map(([x, y]) => `L ${x} ${y}`),
  fc.tuple(pair, pair, pair).map((ps) => `C ${ps.flat().join(' ')}`),
  fc.tuple(pair, pair).map((ps) => `Q ${ps.flat().join(' ')}`),
  pair.map(([x, y]) => `Z M ${x} ${y}`),
  pair.map(([x, y]) => `M ${x} ${y}`),
);

describe('compactPath', () => {
  it('visits the same points as the scene path, to 0.01, on any M/L/C/Z path', () => {
    fc.assert(
      fc.property(pair, fc.array(segment, { maxLength: 300 }), ([x, y], rest) => {
        const d = [`M ${x} ${y}`, ...rest].join(' ');
        const a = absolutePoints(d);
        const b = absolutePoints(compactPath(d));
        expect(b.length).toBe(a.length);
        for (let k = 0; k < a.length; k++) {
          expect(Math.abs(b[k]![0] - a[k]![0])).toBeLessThan(0.005);
          expect(Math.abs(b[k]![1] - a[k]![1])).toBeLessThan(0.005);
        }
      }),
      { numRuns: 500 },
    );
  });

  it('leaves out zero-length lines of a filled outline, and only those', () => {
    // A glyph outline as satori writes it: a line to the current point after each curve.
    const d = 'M 4.9 0.2 L 4.9 0.2 Q 3.7 0.2 2.7 -0.4 L 2.7 -0.4 L 1.8 -1 Z';
    const kept = absolutePoints(compactPath(d, { fillOnly: true }));
    expect(kept).toEqual([[4.9, 0.2], [3.7, 0.2], [2.7, -0.4], [1.8, -1]].map(([x, y]) => [expect.closeTo(x!, 9), expect.closeTo(y!, 9)]));
    expect(absolutePoints(compactPath(d))).toHaveLength(6);
  });

  it('does not drift along a long line: the 1,000th point is still exact', () => {
    const xs = Array.from({ length: 1000 }, (_, k) => Math.round(k * 0.6133 * 100) / 100);
    const d = `M 0 0 ${xs.map((x, k) => `L ${x} ${(k % 7) * 1.01}`).join(' ')}`;
    const last = absolutePoints(compactPath(d)).at(-1)!;
    expect(last[0]).toBeCloseTo(xs.at(-1)!, 9);
  });

  it('is shorter than the scene path it rewrites, and leaves other path data alone', () => {
    const d = 'M 27.87 149.91 L 30 145.27 L 32.13 173.41 L 34.27 118.18';
    // By hand: 30 − 27.87 = 2.13, 145.27 − 149.91 = −4.64, and so on.
    expect(compactPath(d)).toBe('M27.87 149.91l2.13-4.64 2.13 28.14 2.14-55.23');
    expect(compactPath('M 0 0 A 5 5 0 0 1 10 0')).toBe('M 0 0 A 5 5 0 0 1 10 0');
  });
});

describe('compactTenths', () => {
  // Paths in whole tenths, as glyph outlines are: commands and coordinates apart, zero-length lines among them.
  const tenths = fc.integer({ min: -20_000, max: 20_000 });
  const step = fc.oneof(
    fc.tuple(fc.constant('L'), tenths, tenths),
    fc.tuple(fc.constant('L'), fc.constant(null), fc.constant(null)),
    fc.tuple(fc.constant('Q'), tenths, tenths, tenths, tenths),
    fc.tuple(fc.constant('C'), tenths, tenths, tenths, tenths, tenths, tenths),
    fc.tuple(fc.constant('M'), tenths, tenths),
    fc.constant(['Z'] as const),
  );
  it('writes exactly what compactPath (fillOnly) writes for the same absolute path, on any M/L/Q/C/Z outline in tenths', () => {
    fc.assert(
      fc.property(tenths, tenths, fc.array(step, { maxLength: 200 }), (x0, y0, steps) => {
        let commands = 'M';
        const coords: number[] = [x0, y0];
        let absolute = `M ${x0 / 10} ${y0 / 10}`;
        let [cx, cy] = [x0, y0];
        for (const [cmd, ...ns] of steps) {
          // A null line repeats the pen's place: the zero-length lines satori writes.
          const xs = ns[0] === null ? [cx, cy] : (ns as number[]);
          commands += cmd;
          coords.push(...xs);
          absolute += ` ${cmd} ${xs.map((n) => n / 10).join(' ')}`;
          if (xs.length > 0) [cx, cy] = [xs.at(-2)!, xs.at(-1)!];
        }
        expect(compactTenths(commands, coords)).toBe(compactPath(absolute, { fillOnly: true }));
      }),
      { numRuns: 2000 },
    );
  });
  it('returns a flat string: 2,000 label paths of 700 steps kept take a few megabytes, not the 25-fold of a += rope', () => {
    // Label paths are kept for the whole build; grown by +=, 3,077 of them held 172 MB (1,000-characteristic plant).
    setFlagsFromString('--expose-gc');
    const gc = runInNewContext('gc') as () => void;
    const commands = `M${'L'.repeat(700)}Z`;
    const coords = Array.from({ length: 2 * 701 }, (_, i) => (i * 37) % 2000);
    gc();
    const before = getHeapStatistics().used_heap_size;
    const kept = Array.from({ length: 2000 }, () => compactTenths(commands, coords));
    gc();
    const grown = getHeapStatistics().used_heap_size - before;
    const chars = kept.reduce((n, k) => n + k.length, 0);
    // A flat one-byte string costs its length plus a small header; a rope, about 30 bytes per piece.
    expect(chars).toBeGreaterThan(5_000_000);
    expect(grown).toBeLessThan(2 * chars);
  });
});

// Both number writers against Number.prototype.toFixed: what it writes, less trailing zeros.
describe.each([
  { name: 'geom', places: 2, module: '../../src/format.ts' },
  { name: 'pdfNum', places: 3, module: '../../src/render/pdf-ink.ts' },
])('$name', ({ name, places, module }) => {
  it(`writes what toFixed(${places}) writes, less trailing zeros, for any number (checked against Number.prototype.toFixed)`, async () => {
    const write = ((await import(module)) as Record<string, (v: number) => string>)[name]!;
    const scale = 10 ** places;
    const reference = (v: number) => {
      const s = (Math.round(v * scale) / scale).toFixed(places).replace(/\.?0+$/, '');
      return s === '-0' ? '0' : s;
    };
    // Beside everyday values: halves at the last place, float noise, and magnitudes where doubles grow coarser than the last place.
    const edges = [0, -0, 0.5 / scale, -0.5 / scale, 1 + 0.5 / scale, 0.1 + 0.2, 1e-9, -1e-9, 1e14 + 0.37, 123456789012.3456, 2 ** 60, 1e22];
    fc.assert(
      fc.property(fc.oneof(fc.double({ min: -1e7, max: 1e7, noNaN: true }), fc.integer({ min: -1e9, max: 1e9 }).map((n) => n / scale), fc.constantFrom(...edges)), (v) => {
        expect(write(v)).toBe(reference(v));
      }),
      { numRuns: 20_000 },
    );
  });
});
