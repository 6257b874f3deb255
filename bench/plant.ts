/**
 * A synthetic plant for the benchmarks: N characteristics of mixed chart
 * families, 260 weekly points each (five years), with ledgers that freeze,
 * exclude and re-baseline. Seeded, so every run writes the same bytes.
 *
 * Everything it writes is invented: "Fernhill Components" and every figure
 * are fictional.
 */
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { normalFrom, seeded } from '../src/stats/random.ts';

/** The core's seeded generator (mulberry32), with the draws the plant needs. */
function rng(seed: number) {
  const next = seeded(seed);
  const normal = () => normalFrom(next);
  const poisson = (mean: number) => {
    // Knuth's product method for small means, a rounded normal for large ones.
    if (mean > 30) return Math.max(0, Math.round(mean + Math.sqrt(mean) * normal()));
    const limit = Math.exp(-mean);
    let k = 0;
    for (let p = next(); p > limit; p *= next()) k++;
    return k;
  };
  const binomial = (n: number, p: number) => Math.max(0, Math.min(n, Math.round(n * p + Math.sqrt(n * p * (1 - p)) * normal())));
  return { next, normal, poisson, binomial };
}

const DAY = 86_400_000;
const WEEKS = 260;
const iso = (ms: number) => new Date(ms).toISOString().slice(0, 10);
/** The review month's last Monday; the 260 weeks end here. */
const END = Date.UTC(2026, 10, 30);
const weekDate = (k: number) => iso(END - (WEEKS - 1 - k) * 7 * DAY);

const FAMILIES = [
  ['individuals', 30],
  ['xbar-r', 14],
  ['xbar-s', 6],
  ['p', 10],
  ['np', 5],
  ['c', 10],
  ['u', 9],
  ['laney-p', 5],
  ['laney-u', 3],
  ['g', 5],
  ['t', 3],
] as const;
type Family = (typeof FAMILIES)[number][0];

function familyOf(i: number): Family {
  // Interleaved by weight, so any prefix of the plant has the same mix.
  const slot = (i * 37) % 100;
  let acc = 0;
  for (const [f, w] of FAMILIES) if (slot < (acc += w)) return f;
  return 'individuals';
}

export interface PlantOptions {
  readonly characteristics: number;
  readonly seed?: number;
}

/** The review.yaml lines every benchmark workspace shares: the fictional organisation, the review month, the rules. */
export const REVIEW_SETTINGS = [
  'organisation: Fernhill Components (fictional)',
  'period: {from: 2026-11-01, to: 2026-11-30}',
  'rules: western-electric',
  'minPoints: 5',
  'freezeAfter: 20',
] as const;

/** Writes the workspace into `dir` (replacing it) and returns the data file of each characteristic. */
export function writePlant(dir: string, opts: PlantOptions): string[] {
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(path.join(dir, 'data'), { recursive: true });
  const ledger: string[] = [];
  const yaml: string[] = [
    '# A synthetic workspace written by bench/plant.ts for the benchmarks.',
    '# Fernhill Components and every figure here are fictional.',
    `title: Monthly control-limit review — November 2026 (fictional benchmark plant, ${opts.characteristics} characteristics)`,
    ...REVIEW_SETTINGS,
    'characteristics:',
  ];
  const files: string[] = [];
  for (let i = 0; i < opts.characteristics; i++) {
    const r = rng((opts.seed ?? 1) * 100_003 + i);
    const family = familyOf(i);
    const id = `k${String(i + 1).padStart(4, '0')}`;
    const file = `data/${id}.csv`;
    files.push(file);
    // Each characteristic's story: a process change with a re-baseline (every 4th),
    // a shift in the review month (every 9th), an excluded point (every 5th).
    const change = i % 4 === 1 ? 150 : null;
    const shiftsNow = i % 9 === 4;
    const shift = (k: number) => (change !== null && k >= change ? -0.8 : 0) + (shiftsNow && k >= WEEKS - 4 ? 2.5 : 0);
    const rows: string[] = [];
    let header: string;
    const spec = i % 3 === 0;
    let extra = '';
    switch (family) {
      case 'individuals':
      case 'xbar-r':
      case 'xbar-s': {
        header = 'date,value';
        const n = family === 'individuals' ? 1 : family === 'xbar-r' ? 5 : 10;
        for (let k = 0; k < WEEKS; k++) for (let j = 0; j < n; j++) rows.push(`${weekDate(k)},${(50 + shift(k) + r.normal()).toFixed(3)}`);
        extra = `    unit: mm\n    better: target\n${spec ? '    spec: {lower: 45, target: 50, upper: 55}\n' : ''}`;
        break;
      }
      case 'p':
      case 'np':
      case 'laney-p': {
        header = 'date,defectives,inspected';
        const big = family === 'laney-p';
        for (let k = 0; k < WEEKS; k++) {
          const n = family === 'np' ? 200 : big ? 50_000 + Math.floor(r.next() * 20_000) : 400 + Math.floor(r.next() * 300);
          const p = 0.04 * Math.exp(0.25 * shift(k)) * (big ? Math.exp(0.15 * r.normal()) : 1);
          rows.push(`${weekDate(k)},${r.binomial(n, p)},${n}`);
        }
        extra = '    unit: fraction\n    better: lower\n';
        break;
      }
      case 'c':
      case 'u':
      case 'laney-u': {
        const perUnit = family !== 'c';
        header = perUnit ? 'date,count,exposure' : 'date,count';
        for (let k = 0; k < WEEKS; k++) {
          const exposure = family === 'laney-u' ? 20_000 + Math.floor(r.next() * 5_000) : 8 + Math.floor(r.next() * 6);
          const rate = family === 'laney-u' ? 0.01 * Math.exp(0.15 * r.normal()) : 1.2;
          const mean = (perUnit ? exposure : 10) * rate * Math.exp(0.25 * shift(k));
          rows.push(perUnit ? `${weekDate(k)},${r.poisson(mean)},${exposure}` : `${weekDate(k)},${r.poisson(mean)}`);
        }
        extra = '    unit: events a week\n    better: lower\n';
        break;
      }
      case 'g': {
        header = 'date,between';
        for (let k = 0; k < WEEKS; k++) rows.push(`${weekDate(k)},${Math.floor(-Math.log(1 - r.next()) * 12)}`);
        extra = '    unit: working days\n    better: higher\n';
        break;
      }
      case 't': {
        header = 'date';
        // One row per event, about one a week, over the same five years.
        let t = END - (WEEKS - 1) * 7 * DAY;
        for (let k = 0; k < WEEKS && t <= END; k++) {
          rows.push(iso(t));
          t += Math.max(1, Math.round(-Math.log(1 - r.next()) * 6.9)) * DAY;
        }
        extra = '    unit: days\n    better: higher\n';
        break;
      }
    }
    writeFileSync(path.join(dir, file), `${[header, ...rows].join('\n')}\n`);
    const safety = family === 'g' || family === 't' || (family === 'u' && i % 2 === 0);
    yaml.push(`  - id: ${id}`, `    name: Characteristic ${i + 1} (${family})`, `    chart: ${family}`, `    data: ${file}`, `${extra}${safety ? '    safety: true' : ''}`.trimEnd());
    // The ledger: trial limits frozen after 20 points; a re-baseline at the change, frozen again 20 points on.
    const label = (k: number) => (family === 't' ? rows[k + 1] : weekDate(k))!;
    const dated = (k: number) => iso(Date.parse(label(k)) + 2 * DAY);
    if (family !== 't' || rows.length > 30) ledger.push(`${dated(21)},${id},freeze,${label(21)},Trial limits stable over 20 points,A. Okafor`);
    if (i % 5 === 2) ledger.push(`${dated(60)},${id},exclude,${label(60)},Gauge out of calibration that week,A. Okafor`);
    if (change !== null && family !== 't') {
      ledger.push(`${dated(change)},${id},change,${label(change)},New tooling fitted,R. Lindqvist`);
      ledger.push(`${dated(change + 25)},${id},baseline,${label(change)},Shift confirmed after the tooling change,R. Lindqvist`);
      ledger.push(`${dated(change + 25)},${id},freeze,${label(change + 20)},New limits stable over 20 points,R. Lindqvist`);
    }
  }
  ledger.sort((a, b) => (a.slice(0, 10) < b.slice(0, 10) ? -1 : a.slice(0, 10) > b.slice(0, 10) ? 1 : 0));
  writeFileSync(path.join(dir, 'review.yaml'), `${yaml.join('\n')}\n`);
  writeFileSync(path.join(dir, 'ledger.csv'), `${['date,characteristic,action,point,reason,by', ...ledger].join('\n')}\n`);
  return files;
}

// `node --import tsx bench/plant.ts <dir> [N]` writes one for a look.
if (import.meta.url === `file://${process.argv[1]}`) {
  const dir = process.argv[2] ?? 'out/bench/plant';
  const n = Number(process.argv[3] ?? 1000);
  writePlant(dir, { characteristics: n });
  console.log(`wrote ${n} characteristics to ${dir}`);
}
