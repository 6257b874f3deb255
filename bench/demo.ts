/**
 * Benchmark (not a test): the time to build the demo pack, and per-chart
 * render times for each renderer. Run with `npm run bench`.
 */
import { PDFDocument } from 'pdf-lib';
import { planSummary } from '../src/assess.ts';
import { planPack } from '../src/build.ts';
import { loadFonts } from '../src/render/fonts.ts';
import { fontkit } from '../src/render/fontkit.ts';
import { drawScene } from '../src/render/pdf-chart.ts';
import { svgToPng } from '../src/render/png.ts';
import { layoutChart } from '../src/render/scene/layout.ts';
import { chartSpec } from '../src/render/scene/spec.ts';
import { createTextMetrics } from '../src/render/scene/text-metrics.ts';
import { renderStandaloneSvg } from '../src/render/svg-satori.ts';
import { loadWorkspace } from '../src/workspace/load.ts';

const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 5);
const ms = (t: number) => `${t.toFixed(1)} ms`;
const stats = (xs: number[]) => {
  const s = xs.slice().sort((a, b) => a - b);
  return { median: s[Math.floor(s.length / 2)]!, p95: s[Math.min(s.length - 1, Math.ceil(s.length * 0.95) - 1)]! };
};

const t0 = performance.now();
const loaded = loadWorkspace('data/demo');
if (!loaded.ok) throw new Error('the demo workspace does not load');
const ws = loaded.workspace;
const tLoad = performance.now() - t0;

// Warm-up (module loading, WASM init, constants) is reported apart from the steady state.
const w0 = performance.now();
await planPack(ws, ws.config.period.to);
const tFirst = performance.now() - w0;
const builds: number[] = [];
for (let r = 0; r < ROUNDS; r++) {
  const b0 = performance.now();
  await planPack(ws, ws.config.period.to);
  builds.push(performance.now() - b0);
}

const fonts = loadFonts();
const metrics = createTextMetrics(fonts);
const assessed = planSummary(ws, ws.config.period.to).assessments.filter((a) => a.status === 'assessed');
const times = { scene: [] as number[], svg: [] as number[], png: [] as number[], pdf: [] as number[] };
const doc = await PDFDocument.create({ updateMetadata: false });
doc.registerFontkit(fontkit);
const pdfFonts = { regular: await doc.embedFont(fonts.regular, { subset: true }), semibold: await doc.embedFont(fonts.semibold, { subset: true }) };
for (let r = 0; r < ROUNDS; r++) {
  for (const a of assessed) {
    let t = performance.now();
    const scene = layoutChart(chartSpec(a, ws.config.period), metrics);
    times.scene.push(performance.now() - t);
    t = performance.now();
    const svg = await renderStandaloneSvg(scene, fonts);
    times.svg.push(performance.now() - t);
    t = performance.now();
    svgToPng(svg, [fonts.regularPath, fonts.semiboldPath], scene.width * 2);
    times.png.push(performance.now() - t);
    t = performance.now();
    drawScene(doc.addPage([scene.width, scene.height]), scene, { x: 0, top: scene.height, scale: 1 }, pdfFonts);
    times.pdf.push(performance.now() - t);
  }
}

console.log(`demo workspace: ${assessed.length} characteristics, ${ROUNDS} rounds`);
console.log(`read workspace          ${ms(tLoad)}`);
console.log(`first build (cold)      ${ms(tFirst)}`);
console.log(`build, warm             median ${ms(stats(builds).median)}  p95 ${ms(stats(builds).p95)}`);
for (const [name, xs] of Object.entries(times)) {
  const s = stats(xs);
  console.log(`per chart: ${name.padEnd(6)}       median ${ms(s.median)}  p95 ${ms(s.p95)}`);
}
console.log(`peak resident memory    ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MiB`);
