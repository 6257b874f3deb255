/**
 * Benchmark (not a test): plumbline's own PDF against the browser route,
 * `npm run bench:compare`. For plants of 100 and 1,000 characteristics
 * (bench/plant.ts) it times, in one run:
 *   - plumbline's whole build (child process, cold, no cache);
 *   - plumbline's PDF stage alone (toPdf, from the same pages, in process);
 *   - headless Chromium (Debian's /usr/bin/chromium through playwright-core)
 *     printing plumbline's own index.html to PDF, from opening the page to
 *     the file written; the browser's start is timed apart.
 * and prints the times, the ratios and the file sizes.
 * BENCH_SIZES (default "100,1000") picks the plants.
 */
import { mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';
import { planPack } from '../src/build.ts';
import { loadWorkspace } from '../src/workspace/load.ts';
import { type Measured, measure } from './child.ts';
import { writePlant } from './plant.ts';

const sizes = (process.env.BENCH_SIZES ?? '100,1000').split(',').map(Number);
const root = path.resolve('out/bench');
const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`;
const mib = (b: number) => `${(b / (1 << 20)).toFixed(1)} MiB`;

function build(ws: string, out: string): Measured {
  rmSync(out, { recursive: true, force: true });
  return measure(['build', ws, '--out', out, '--no-cache', '-q']);
}

console.log(`plumbline against Chromium's print to PDF (Debian chromium, playwright-core); Node ${process.version}`);
const rows: string[][] = [['characteristics', 'plumbline build', 'plumbline PDF stage', 'Chromium print', 'build / print', 'print / PDF stage', 'pack.pdf', 'Chromium PDF', 'index.html']];
for (const n of sizes) {
  const ws = path.join(root, `plant-${n}`);
  const out = path.join(root, `compare-${n}`);
  writePlant(ws, { characteristics: n });
  const whole = build(ws, out);

  // The PDF stage alone, from the same workspace, in this process.
  const loaded = loadWorkspace(ws);
  if (!loaded.ok) throw new Error('the plant does not load');
  let pdfMs = 0;
  await planPack(loaded.workspace, loaded.workspace.config.period.to, { paper: 'a4', png: false, timing: (stage, ms) => (stage === 'pdf' ? (pdfMs = ms) : undefined) });

  // Chromium prints the pack's own index.html.
  const profile = mkdtempSync(path.join(tmpdir(), 'plumbline-chromium-'));
  const t0 = performance.now();
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: '/usr/bin/chromium',
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  const launchMs = performance.now() - t0;
  const page = await context.newPage();
  page.setDefaultTimeout(0);
  const printed = path.join(out, 'chromium.pdf');
  const t1 = performance.now();
  await page.goto(pathToFileURL(path.join(out, 'index.html')).href, { waitUntil: 'load', timeout: 0 });
  const pdf = await page.pdf({ format: 'A4', printBackground: true });
  writeFileSync(printed, pdf);
  const printMs = performance.now() - t1;
  await context.close();
  rmSync(profile, { recursive: true, force: true });

  const size = (f: string) => statSync(path.join(out, f)).size;
  rows.push([
    String(n),
    `${s(whole.wallMs)} (${whole.maxRssMiB.toFixed(0)} MiB)`,
    s(pdfMs),
    `${s(printMs)} (+${s(launchMs)} start)`,
    `${(whole.wallMs / printMs).toFixed(2)}×`,
    `${(printMs / pdfMs).toFixed(2)}×`,
    mib(size('pack.pdf')),
    mib(size('chromium.pdf')),
    mib(size('index.html')),
  ]);
  console.log(`${n} characteristics measured`);
}
const widths = rows[0]!.map((_, c) => Math.max(...rows.map((r) => r[c]!.length)));
for (const r of rows) console.log(r.map((cell, c) => cell.padEnd(widths[c]!)).join('  '));
console.log('build / print below 1 means the whole build is faster than the print alone; print / PDF stage is how many times faster the PDF stage is.');
