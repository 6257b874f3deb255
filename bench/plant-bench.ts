/**
 * Benchmark (not a test) of a plant-sized review: `npm run bench`.
 *
 * On a seeded synthetic workspace (bench/plant.ts; 1,000 characteristics
 * of mixed families, 260 weekly points each, ledgers with freezes,
 * exclusions and re-baselines) it prints:
 *   - reading + statistics + signals alone (in this process);
 *   - the full build (Markdown, HTML, PDF) in a child process: wall time and
 *     peak resident memory, with --jobs 1 and with the default;
 *   - a rebuild after one data file changed (the build cache at work);
 *   - per-chart render time of each renderer, median and p95;
 *   - output sizes, HTML bytes per characteristic among them;
 *   - the statistics core alone on 1,000 characteristics × 1,000 points:
 *     statistics and signals, then the whole analysis, each in a fresh
 *     process, twice (bench/core.ts).
 * BENCH_CHARACTERISTICS (default 1000) sizes the plant.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { planSummary } from '../src/assess.ts';
import { loadFonts } from '../src/render/fonts.ts';
import { fontkit } from '../src/render/fontkit.ts';
import { drawScene } from '../src/render/pdf-chart.ts';
import { SheetInk } from '../src/render/pdf-ink.ts';
import { svgToPng } from '../src/render/png.ts';
import { layoutChart } from '../src/render/scene/layout.ts';
import { chartSpec } from '../src/render/scene/spec.ts';
import { createTextMetrics } from '../src/render/scene/text-metrics.ts';
import { LabelPaths, renderStandaloneSvg } from '../src/render/svg-satori.ts';
import { inlineSvg } from '../src/render/svg-inline.ts';
import { loadWorkspace } from '../src/workspace/load.ts';
import { measure } from './child.ts';
import { peakMiB } from './peak.mjs';
import { writePlant } from './plant.ts';

const N = Number(process.env.BENCH_CHARACTERISTICS ?? 1000);
const root = path.resolve('out/bench');
const ws = path.join(root, `plant-${N}`);
const pack = path.join(root, `pack-${N}`);

const fmtMs = (t: number) => (t >= 10_000 ? `${(t / 1000).toFixed(1)} s` : t >= 1000 ? `${(t / 1000).toFixed(2)} s` : `${t.toFixed(1)} ms`);
const fmtBytes = (b: number) => (b >= 1 << 20 ? `${(b / (1 << 20)).toFixed(1)} MiB` : `${(b / 1024).toFixed(1)} KiB`);
const quantiles = (xs: number[]) => {
  const s = xs.slice().sort((a, b) => a - b);
  return { median: s[Math.floor(s.length / 2)]!, p95: s[Math.min(s.length - 1, Math.ceil(s.length * 0.95) - 1)]! };
};
const line = (label: string, value: string) => console.log(`${label.padEnd(44)} ${value}`);

function sizeOf(p: string): number {
  const st = statSync(p);
  if (!st.isDirectory()) return st.size;
  return readdirSync(p).reduce((n, f) => n + sizeOf(path.join(p, f)), 0);
}

console.log(`plumbline plant benchmark: ${N} characteristics (seeded synthetic plant, bench/plant.ts), ${process.platform} ${process.arch}, Node ${process.version}`);
let t = performance.now();
const files = writePlant(ws, { characteristics: N });
line('write the synthetic workspace', fmtMs(performance.now() - t));

// 1. Reading + statistics + signals, in this process.
t = performance.now();
const loaded = loadWorkspace(ws);
if (!loaded.ok) throw new Error('the benchmark workspace does not load');
const tRead = performance.now() - t;
t = performance.now();
const plan = planSummary(loaded.workspace, loaded.workspace.config.period.to);
const tStats = performance.now() - t;
line('read workspace', fmtMs(tRead));
line('statistics + signals + recommendations', fmtMs(tStats));
line('read + statistics + signals', fmtMs(tRead + tStats));

// 2. Full builds, each in a fresh process.
rmSync(pack, { recursive: true, force: true });
const cold1 = measure(['build', ws, '--out', pack, '--no-cache', '--jobs', '1', '-q']);
rmSync(pack, { recursive: true, force: true });
const cold = measure(['build', ws, '--out', pack, '-q']);
line('full pack, cold, --jobs 1 (md, html, pdf)', `${fmtMs(cold1.wallMs)}, peak ${cold1.maxRssMiB.toFixed(0)} MiB`);
line(`full pack, cold, default jobs`, `${fmtMs(cold.wallMs)}, peak ${cold.maxRssMiB.toFixed(0)} MiB`);
const warm = measure(['build', ws, '--out', pack, '-q']);
line('rebuild, nothing changed (cache)', `${fmtMs(warm.wallMs)}, peak ${warm.maxRssMiB.toFixed(0)} MiB`);
// One characteristic's last reading corrected: a real change to one data file (k0001, an individuals chart).
const changed = path.join(ws, files[0]!);
const rows = readFileSync(changed, 'utf8').trimEnd().split('\n');
const [date, value] = rows.at(-1)!.split(',');
rows[rows.length - 1] = `${date},${(Number(value) + 0.5).toFixed(3)}`;
writeFileSync(changed, `${rows.join('\n')}\n`);
const one = measure(['build', ws, '--out', pack, '-q']);
line('rebuild after one data file changed', `${fmtMs(one.wallMs)}, peak ${one.maxRssMiB.toFixed(0)} MiB`);

// 3. Output sizes.
const size = (f: string) => sizeOf(path.join(pack, f));
line('index.html', `${fmtBytes(size('index.html'))} (${(size('index.html') / N / 1024).toFixed(1)} KiB per characteristic)`);
line('index.md', fmtBytes(size('index.md')));
line('pack.pdf', `${fmtBytes(size('pack.pdf'))}`);
line('summary.json', fmtBytes(size('summary.json')));
line('charts/ (standalone SVG)', `${fmtBytes(size('charts'))} (${(size('charts') / N / 1024).toFixed(1)} KiB per chart)`);
line('.plumbline-cache/ (not part of the pack)', fmtBytes(size('.plumbline-cache')));

// 4. Per-chart render time of each renderer, on a sample of the plant's charts.
const fonts = loadFonts();
const metrics = createTextMetrics(fonts);
const assessed = plan.assessments.filter((a) => a.status === 'assessed');
const sample = assessed.filter((_, i) => i % Math.max(1, Math.floor(assessed.length / 200)) === 0);
const times = { scene: [] as number[], 'svg (satori, labels cached)': [] as number[], 'svg (satori, first chart: glyphs laid out)': [] as number[], 'inline svg (html)': [] as number[], png: [] as number[], pdf: [] as number[] };
const pdfFaces = { regular: { key: 'F0', font: fontkit.create(fonts.regular) }, semibold: { key: 'F1', font: fontkit.create(fonts.semibold) } };
const shared = new LabelPaths(fonts);
for (const a of sample) {
  let s = performance.now();
  const scene = layoutChart(chartSpec(a, loaded.workspace.config.period), metrics);
  times.scene.push(performance.now() - s);
  s = performance.now();
  await renderStandaloneSvg(scene, fonts, new LabelPaths(fonts));
  times['svg (satori, first chart: glyphs laid out)'].push(performance.now() - s);
  await renderStandaloneSvg(scene, fonts, shared);
  // Each renderer timed on a copy of the scene of its own: a build compacts a primitive's path data
  // once for both SVGs (path-data.ts), and a render of the same objects would find it done.
  let fresh = structuredClone(scene);
  s = performance.now();
  const svg = await renderStandaloneSvg(fresh, fonts, shared);
  times['svg (satori, labels cached)'].push(performance.now() - s);
  fresh = structuredClone(scene);
  s = performance.now();
  inlineSvg(fresh, 'c');
  times['inline svg (html)'].push(performance.now() - s);
  s = performance.now();
  svgToPng(svg, [fonts.regularPath, fonts.semiboldPath], scene.width * 2);
  times.png.push(performance.now() - s);
  s = performance.now();
  // The chart's page operators (the PDF stage compresses and joins them afterwards).
  drawScene(new SheetInk(), scene, { x: 0, top: scene.height, scale: 1 }, pdfFaces);
  times.pdf.push(performance.now() - s);
}
for (const [name, xs] of Object.entries(times)) {
  const q = quantiles(xs);
  line(`per chart: ${name}`, `median ${fmtMs(q.median)}, p95 ${fmtMs(q.p95)} (${xs.length} charts)`);
}

// 5. The statistics core alone, in a fresh process (bench/core.ts): here, the plant's data would
// still be on the heap and its collection would be counted against the core.
// Each stage in a fresh process of its own, so neither is timed with the other's compiled code.
for (const stage of ['panels', 'whole']) {
  const core = spawnSync(process.execPath, ['--import', 'tsx', path.resolve('bench/core.ts'), stage], { encoding: 'utf8' });
  if (core.status !== 0) throw new Error(`bench/core.ts failed:\n${core.stderr}`);
  process.stdout.write(core.stdout);
}
line('peak resident memory of this process', `${peakMiB().toFixed(0)} MiB`);
