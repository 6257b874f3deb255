// Regenerates the README screenshots from the demo pack: `npm run screenshots`.
// Needs the demo pack built with PNG charts (npm run demo), poppler's pdftoppm
// and Debian's Chromium. Everything shown is the fictional demo workspace.
import { execFileSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';

const root = path.join(path.dirname(fileURLToPath(import.meta.url)), '..');
const pack = path.join(root, 'out/demo');
const shots = path.join(root, 'docs/screenshots');

for (const id of ['line-stoppages', 'closure-wall']) copyFileSync(path.join(pack, `charts/${id}.png`), path.join(shots, `chart-${id}.png`));

// PDF pages: where "Decisions needed" and "Line stoppages" begin (pdftotext ends each page with a form feed).
const pages = execFileSync('pdftotext', [path.join(pack, 'pack.pdf'), '-'], { encoding: 'utf8' }).split('\f');
const startOf = (title) => pages.findIndex((p) => p.trimStart().startsWith(title)) + 1;
for (const [page, name] of [[startOf('Decisions needed'), 'pdf-decisions'], [startOf('Line stoppages'), 'pdf-line-stoppages']]) {
  const base = path.join(shots, name);
  execFileSync('pdftoppm', ['-r', '90', '-png', '-singlefile', '-f', String(page), '-l', String(page), path.join(pack, 'pack.pdf'), base]);
}

const profile = mkdtempSync(path.join(tmpdir(), 'plumbline-chromium-'));
const context = await chromium.launchPersistentContext(profile, {
  executablePath: '/usr/bin/chromium',
  headless: true,
  args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
const page = await context.newPage();
await page.setViewportSize({ width: 960, height: 1100 });
await page.goto(pathToFileURL(path.join(pack, 'index.html')).href);
await page.screenshot({ path: path.join(shots, 'html-top.png') });
await context.close();
rmSync(profile, { recursive: true, force: true });
console.log(`screenshots written to ${shots}`);

