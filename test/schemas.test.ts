/**
 * The shipped JSON Schemas: generated from the zod schemas (so the committed
 * files must equal a fresh generation), and checked with Ajv, a JSON Schema
 * validator independent of zod, against the demo workspace and its summary.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import Ajv2020 from 'ajv/dist/2020.js';
import { parse as parseYaml } from 'yaml';
import { describe, expect, it } from 'vitest';
import { planSummary } from '../src/assess.ts';
import { SCHEMA_FILES, schemaText } from '../src/schemas.ts';
import { summarySchema } from '../src/summary-schema.ts';
import { loadWorkspace } from '../src/workspace/load.ts';
import { summaryOf } from '../src/summary.ts';
import { assess } from './helpers/in-memory.ts';

const ROOT = path.join(import.meta.dirname, '..');
const ajv = new Ajv2020({ strict: false, allErrors: true });
const schema = (file: string) => JSON.parse(readFileSync(path.join(ROOT, file), 'utf8'));
const validateReview = ajv.compile(schema('schemas/review.schema.json'));
const validateSummary = ajv.compile(schema('schemas/summary.schema.json'));

const loaded = loadWorkspace(path.join(ROOT, 'data/demo'));
if (!loaded.ok) throw new Error('demo does not load');
const summary = JSON.parse(JSON.stringify(planSummary(loaded.workspace, '2026-11-30').summary));

describe('JSON Schemas in schemas/', () => {
  for (const [file, build] of Object.entries(SCHEMA_FILES)) {
    it(`${file} is what npm run schemas generates from the reader's schema`, () => {
      expect(readFileSync(path.join(ROOT, file), 'utf8')).toBe(schemaText(build));
    });
  }
  it('the demo review.yaml validates', () => {
    const ok = validateReview(parseYaml(readFileSync(path.join(ROOT, 'data/demo/review.yaml'), 'utf8')));
    expect(validateReview.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
  });
  it('a review.yaml with an unknown chart family, a bad id or an unknown key does not', () => {
    const base = parseYaml(readFileSync(path.join(ROOT, 'data/demo/review.yaml'), 'utf8'));
    for (const broken of [
      { ...base, characteristics: [{ ...base.characteristics[0], chart: 'pie' }] },
      { ...base, characteristics: [{ ...base.characteristics[0], id: 'Fill Volume' }] },
      { ...base, colour: 'blue' },
      { ...base, period: { from: '1 Nov 2026', to: '2026-11-30' } },
    ]) expect(validateReview(broken)).toBe(false);
  });
  it('the demo summary.json validates, and parses with the zod schema the test suite keeps in step with buildSummary', () => {
    const ok = validateSummary(summary);
    expect(validateSummary.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
    expect(summarySchema.safeParse(summary).success).toBe(true);
  });
  it('a characteristic that cannot be assessed is described by the schema too', () => {
    const a = assess({ chart: 'individuals', csv: 'label,date,value\n1,2026-01-01,abc\n' });
    expect(a.status).toBe('not-assessed');
    const s = JSON.parse(JSON.stringify(summaryOf({ ...loaded.workspace.config, characteristics: [a.characteristic] }, [a], [], '2026-11-30')));
    expect(validateSummary(s)).toBe(true);
    expect(s.characteristics[0].status).toBe('not-assessed');
  });
  it('a summary missing a contract field does not validate', () => {
    const c = { ...summary.characteristics[0] };
    delete c.points;
    expect(validateSummary({ ...summary, characteristics: [c] })).toBe(false);
    expect(validateSummary({ ...summary, format: 2 })).toBe(false);
  });
});
