/**
 * Benchmark (not a test) of a very long series: `npm run bench:long`.
 *
 * One characteristic of 1,000,000 readings, one a minute (about 23 months
 * to the end of the review period), seeded normal values with a small
 * shift in the review month. It builds the pack twice in a child process,
 * as two monthly reviews would (the second reads the first as its previous
 * pack), and prints each build's wall time and peak resident memory (worker
 * threads included) against the 1 GiB target, and the sizes of the outputs.
 * LONG_POINTS (default 1,000,000) sizes the series.
 *
 * Everything it writes is invented: "Fernhill Components", its spindle and
 * every reading are fictional.
 */
import { mkdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { normalFrom, seeded } from '../src/stats/random.ts';
import { measure } from './child.ts';
import { REVIEW_SETTINGS } from './plant.ts';

const N = Number(process.env.LONG_POINTS ?? 1_000_000);
const root = path.resolve('out/bench');
const ws = path.join(root, `long-${N}`);
const pack = path.join(root, `long-${N}-pack`);
const GiB = 1024;

const line = (label: string, value: string) => console.log(`${label.padEnd(44)} ${value}`);
const mib = (b: number) => `${(b / (1 << 20)).toFixed(1)} MiB`;

function writeSeries(): void {
  rmSync(ws, { recursive: true, force: true });
  mkdirSync(path.join(ws, 'data'), { recursive: true });
  writeFileSync(
    path.join(ws, 'review.yaml'),
    [
      '# A synthetic workspace written by bench/long-series.ts for the benchmarks.',
      '# Fernhill Components, its spindle and every reading are fictional.',
      'title: Spindle temperature, minute by minute — November 2026 (fictional benchmark)',
      ...REVIEW_SETTINGS,
      'characteristics:',
      '  - id: spindle-temperature',
      '    name: Spindle temperature, machine 4',
      '    chart: individuals',
      '    data: data/spindle-temperature.csv',
      '    unit: °C',
      '    better: target',
      '',
    ].join('\n'),
  );
  writeFileSync(path.join(ws, 'ledger.csv'), 'date,characteristic,action,point,reason,by\n');
  const next = seeded(2026);
  const end = Date.UTC(2026, 10, 30, 23, 59);
  const periodStart = Date.UTC(2026, 10, 1);
  const rows: string[] = ['label,date,value'];
  for (let i = 0; i < N; i++) {
    const t = end - (N - 1 - i) * 60_000;
    const iso = new Date(t).toISOString();
    const value = 41 + (t >= periodStart + 20 * 86_400_000 ? 0.4 : 0) + 0.5 * normalFrom(next);
    rows.push(`${iso.slice(0, 16)},${iso.slice(0, 10)},${value.toFixed(3)}`);
  }
  writeFileSync(path.join(ws, 'data/spindle-temperature.csv'), `${rows.join('\n')}\n`);
}

console.log(`plumbline long-series benchmark: one series of ${N.toLocaleString('en-GB')} minute readings (seeded, fictional), ${process.platform} ${process.arch}, Node ${process.version}`);
let t = performance.now();
writeSeries();
line('write the workspace', `${((performance.now() - t) / 1000).toFixed(1)} s, ${mib(statSync(path.join(ws, 'data/spindle-temperature.csv')).size)} of data`);
rmSync(pack, { recursive: true, force: true });
for (const run of ['first month (no previous pack)', 'second month (the first as previous)']) {
  t = performance.now();
  const r = measure(['build', ws, '--out', pack, '-q']);
  const verdict = r.maxRssMiB <= GiB ? 'within' : 'over';
  line(`build, ${run}`, `${(r.wallMs / 1000).toFixed(1)} s, peak ${r.maxRssMiB.toFixed(0)} MiB (${verdict} the 1 GiB target), exit ${r.code}`);
}
for (const f of ['summary.json', 'record.json', 'index.html', 'index.md', 'pack.pdf', 'charts/spindle-temperature.svg']) line(f, mib(statSync(path.join(pack, f)).size));
