/// <reference lib="dom" />
/**
 * The HTML pack as a reader opens it: Debian's Chromium driven by
 * playwright-core (never a downloaded browser), with the network flags this
 * machine needs. A screenshot is kept under out/screenshots/ to look at.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import type { BrowserContext } from 'playwright-core';
import { launchChromium } from '../helpers/browser.ts';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { planPack } from '../../src/build.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';

const ROOT = path.join(import.meta.dirname, '../..');
const SHOTS = path.join(ROOT, 'out/screenshots');
const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-browser-'));
const profile = mkdtempSync(path.join(tmpdir(), 'plumbline-chromium-'));

let context: BrowserContext;
const requests: string[] = [];
const problems: string[] = [];
let pageUrl: string;
let characteristics = 0;

beforeAll(async () => {
  const loaded = loadWorkspace(path.join(ROOT, 'data/demo'));
  if (!loaded.ok) throw new Error('demo does not load');
  characteristics = loaded.workspace.config.characteristics.length;
  const plan = await planPack(loaded.workspace, '2026-11-30');
  const file = path.join(temp, 'index.html');
  writeFileSync(file, plan.files.get('index.html')!);
  pageUrl = pathToFileURL(file).href;
  context = await launchChromium(profile);
});

afterAll(async () => {
  await context?.close();
  rmSync(temp, { recursive: true, force: true });
  rmSync(profile, { recursive: true, force: true });
});

describe('index.html in headless Chromium', () => {
  it('loads with no console errors, no blocked content and no request but the page itself', async () => {
    const page = await context.newPage();
    page.on('request', (r) => requests.push(r.url()));
    page.on('console', (m) => {
      if (m.type() === 'error' || m.type() === 'warning') problems.push(`${m.type()}: ${m.text()}`);
    });
    page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
    await page.setViewportSize({ width: 1000, height: 1300 });
    await page.goto(pageUrl, { waitUntil: 'load' });
    const fontsReady = await page.evaluate(async () => {
      await document.fonts.ready;
      return document.fonts.check('600 12px "IBM Plex Sans"') && document.fonts.check('12px "IBM Plex Sans"');
    });
    expect(fontsReady).toBe(true);
    expect(problems).toEqual([]);
    expect(requests.filter((u) => u !== pageUrl && !u.startsWith('data:'))).toEqual([]);

    // Every chart is laid out with a real size and inside the page.
    const boxes = await page.locator('svg.chart').evaluateAll((svgs) => svgs.map((s) => s.getBoundingClientRect().toJSON() as DOMRect));
    expect(boxes).toHaveLength(characteristics);
    for (const b of boxes) {
      expect(b.width).toBeGreaterThan(600);
      expect(b.height).toBeGreaterThan(200);
    }
    // Chart labels are text the page can find.
    const labels = await page.locator('svg.chart text').allTextContents();
    expect(labels.filter((t) => t.startsWith('UCL ')).length).toBeGreaterThanOrEqual(11);

    mkdirSync(SHOTS, { recursive: true });
    await page.screenshot({ path: path.join(SHOTS, 'demo-html-top.png') });
    await page.locator('#c-line-stoppages').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SHOTS, 'demo-html-chart.png') });
    await page.close();
  });
  it('in print media every section starts a new page, as in pack.pdf', async () => {
    const page = await context.newPage();
    await page.goto(pageUrl, { waitUntil: 'load' });
    await page.emulateMedia({ media: 'print' });
    const breaks = await page.locator('h2').evaluateAll((hs) => hs.map((h) => getComputedStyle(h).breakBefore));
    expect(breaks.every((b) => b === 'page')).toBe(true);
    await page.close();
  });
});
