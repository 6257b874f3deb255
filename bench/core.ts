/**
 * Benchmark (not a test): the statistics core alone, 1,000 individuals
 * characteristics of 1,000 seeded points each, analysed in memory in a
 * fresh process (`npm run bench` runs it once per stage;
 * `node --import tsx bench/core.ts [panels|whole]` alone). `panels`: the
 * statistics and signals (ledger, baselines, limits per point, every rule on
 * both panels; `computePanels`). `whole` (the default): the whole analysis,
 * which goes on to the evidence (change-point permutation test, false-alarm
 * simulation, limit uncertainty) and the recommendation (`analyse`).
 */
import { analyse, computePanels } from '../src/analyse.ts';
import type { IsoDate, ReviewConfig, Sample } from '../src/model.ts';
import { normalFrom, seeded } from '../src/stats/random.ts';
import { peakMiB } from './peak.mjs';

const fmtMs = (t: number) => (t >= 1000 ? `${(t / 1000).toFixed(2)} s` : `${t.toFixed(0)} ms`);
const line = (label: string, value: string) => console.log(`${label.padEnd(44)} ${value}`);

const CORE = 1000;
const config: ReviewConfig = {
  title: 'core',
  organisation: '',
  period: { from: '2026-01-01', to: '2026-12-31' },
  rules: 'western-electric',
  minPoints: 5,
  freezeAfter: 20,
  customers: {},
  characteristics: [],
};
const uniform = seeded(7);
const normal = () => normalFrom(uniform);
const day0 = Date.UTC(2024, 3, 6);
const dates = Array.from({ length: CORE }, (_, k) => new Date(day0 + k * 86_400_000).toISOString().slice(0, 10) as IsoDate);
const series = Array.from({ length: CORE }, () =>
  dates.map((date, k): Sample => ({ line: k + 2, label: date, date, observation: { kind: 'measurements', values: [50 + normal()] } })),
);
const stage = process.argv[2] ?? 'whole';
if (stage !== 'panels' && stage !== 'whole') throw new Error(`bench/core.ts: unknown stage ${stage} (panels or whole)`);
// Twice: the first pass also compiles the code (and, for the whole analysis, simulates the
// false-alarm figure for the period's 365 points, cached after); the second shows the steady cost.
for (const pass of ['first pass', 'second pass']) {
  const t = performance.now();
  let signals = 0;
  for (let c = 0; c < CORE; c++) {
    const input = {
      config,
      characteristic: { id: `c${c}`, name: 'c', chart: 'individuals', data: 'd.csv', unit: '', better: 'target', safety: false, tags: [] },
      samples: series[c]!,
      laterLabels: new Set<string>(),
      ledger: [],
      ledgerFile: 'ledger.csv',
      diagnostics: [],
      asOf: '2026-12-31',
    } as const;
    const a = stage === 'panels' ? computePanels(input) : analyse(input);
    if (a.status !== 'not-assessed') signals += a.location.signals.length + (a.dispersion?.signals.length ?? 0);
  }
  const tCore = performance.now() - t;
  const what = stage === 'panels' ? 'statistics + signals (limits, rules; computePanels)' : 'whole analysis (+ evidence, recommendation)';
  line(`${what}, ${CORE} × ${CORE} points, ${pass}`, `${fmtMs(tCore)} (${signals} signals)`);
}
line(`peak resident memory of the core process (${stage})`, `${peakMiB().toFixed(0)} MiB`);
