/**
 * A customer's pack (`build --only tag=NAME`) and the new figures in the
 * demo pack: the customer's name on the cover, only the tagged
 * characteristics, and a manifest covering only what went into that pack;
 * capability, rates, chart notes and chart-specific cautions where they
 * apply. Outputs are read back with tools outside plumbline (pdftotext,
 * JSON.parse, node:crypto).
 */
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type PlannedPack, planPack } from '../src/build.ts';
import { summarySchema } from '../src/summary-schema.ts';
import { loadWorkspace } from '../src/workspace/load.ts';
import { selectByTag } from '../src/workspace/select.ts';
import { pdftotext } from './helpers/pdf.ts';

const DEMO = path.join(import.meta.dirname, '../data/demo');
const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-customer-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));
const text = (b: Uint8Array | undefined) => new TextDecoder().decode(b);

const loaded = loadWorkspace(DEMO);
if (!loaded.ok) throw new Error('demo does not load');
const ws = loaded.workspace;
// The characteristics review.yaml tags harbour-market, read from the configuration rather than from a build.
const tagged = ws.config.characteristics.filter((c) => c.tags.includes('harbour-market'));

let customer: PlannedPack;
let full: PlannedPack;
beforeAll(async () => {
  const selected = selectByTag(ws, 'harbour-market')!;
  customer = await planPack(selected.workspace, '2026-11-30', { paper: 'a4', png: false, audience: { tag: 'harbour-market', name: selected.name } });
  full = await planPack(ws, '2026-11-30', { paper: 'a4', png: false });
});

describe('build --only tag=harbour-market', () => {
  it('holds only the tagged characteristics, each with its chart', () => {
    expect(tagged.length).toBeGreaterThan(1);
    const summary = JSON.parse(text(customer.files.get('summary.json')));
    expect(summary.characteristics.map((c: { id: string }) => c.id)).toEqual(tagged.map((c) => c.id));
    expect([...customer.files.keys()].filter((f) => f.startsWith('charts/')).sort()).toEqual(tagged.map((c) => `charts/${c.id}.svg`).sort());
  });
  it('prints the customer’s name from review.yaml on the cover of the PDF and in the HTML', () => {
    const file = path.join(temp, 'customer.pdf');
    writeFileSync(file, customer.files.get('pack.pdf')!);
    const first = pdftotext(file).split('\f')[0]!;
    expect(first).toMatch(/Prepared for\s+Harbour Market Stores \(fictional retail customer\)/);
    expect(text(customer.files.get('index.html'))).toContain('Harbour Market Stores (fictional retail customer)');
  });
  it('its manifest lists as inputs only review.yaml, the ledger, the templates read and the tagged data files, with their SHA-256', () => {
    const manifest = JSON.parse(text(customer.files.get('manifest.json')));
    const inputs: { path: string; sha256: string }[] = manifest.inputs;
    expect(inputs.map((i) => i.path).sort()).toEqual(['ledger.csv', 'review.yaml', ...new Set(tagged.map((c) => c.data))].sort());
    for (const i of inputs) expect(i.sha256).toBe(createHash('sha256').update(ws.inputs.get(i.path)!).digest('hex'));
    expect(manifest.outputs.map((o: { path: string }) => o.path).sort()).toEqual([...customer.files.keys()].filter((f) => f !== 'manifest.json').sort());
  });
  it('an unknown tag selects nothing', () => expect(selectByTag(ws, 'no-such-customer')).toBeNull());
});

describe('the new figures in the full demo pack', () => {
  const summary = () => summarySchema.parse(JSON.parse(text(full.files.get('summary.json'))));
  const byId = (id: string) => summary().characteristics.find((c) => c.id === id)!;

  it('summary.json carries capability, rates, overdispersion, notes and the auto choice where they apply', () => {
    const s = summary();
    for (const c of s.characteristics) {
      const conf = ws.config.characteristics.find((x) => x.id === c.id)!;
      const variables = ['individuals', 'xbar-r', 'xbar-s'].includes(c.chart);
      // Capability applies exactly to variables charts with a specification.
      expect(c.capability === null, c.id).toBe(!(variables && conf.spec));
      expect(c.rates === null, c.id).toBe(!['u', 'laney-u'].includes(c.chart));
      expect(c.overdispersion === null || ['p', 'np', 'c', 'u'].includes(c.chart), c.id).toBe(true);
      expect(c.chartChoice !== null, c.id).toBe(conf.chart === 'auto');
    }
    expect(byId('spills').chart).toBe('g');
    expect(byId('vision-rejects-p').overdispersion).toMatchObject({ recommend: true });
  });
  it('the g chart of injury gaps signals its long November gap above the upper limit, an improvement', () => {
    const g = byId('injury-gaps');
    const last = g.points.at(-1)!;
    expect(last.value).toBeGreaterThan(last.ucl!);
    expect(last.signals).toContain('beyond-limits');
  });
  it('the g chart’s long gap is reported as an improvement to understand, and the overdispersed p chart points to laney-p', () => {
    expect(byId('injury-gaps').recommendation!.reasons.join(' ')).toMatch(/on the better side: an improvement worth understanding/);
    const p = byId('vision-rejects-p').recommendation!.reasons.join(' ');
    expect(p).toMatch(/vary far more than the binomial model allows \(σz = \d\.\d\d/);
    expect(p).toMatch(/Consider chart: laney-p/);
    // The Laney chart of the same data keeps its limits: none of its points lies beyond them in the period.
    expect(byId('vision-rejects').recommendation!.action).toBe('keep');
  });
  it('the cautions section has the chart-specific cautions for gaps, incidence rates and few events', () => {
    const md = text(full.files.get('index.md'));
    const cautions = md.slice(md.indexOf('## Cautions'));
    for (const phrase of ['Gaps between events.', 'Incidence rates.', 'Few events a period.', 'Local rules and qualified people decide.']) expect(cautions).toContain(phrase);
  });
  it('each characteristic section shows its capability and rates tables where they apply', () => {
    const md = text(full.files.get('index.md'));
    const section = (name: string) => {
      const start = md.indexOf(`## ${name}`);
      return md.slice(start, md.indexOf('\n## ', start + 3));
    };
    expect(section('Fill volume, line 1')).toMatch(/### Capability[\s\S]*\| Cpk/);
    expect(section('Neck finish diameter, new mould')).toMatch(/### Capability\s+The current baseline is still collecting points/);
    expect(section('Recordable injuries per 200,000 hours worked')).toMatch(/### Rates[\s\S]*Events per 200,000 units of exposure/);
    expect(section('Label defects')).not.toMatch(/### (Capability|Rates)/);
  });
});
