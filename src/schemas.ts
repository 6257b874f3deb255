/**
 * JSON Schemas for review.yaml and summary.json, generated from the zod
 * schemas the reader and the tests use, so they cannot drift. Written to
 * schemas/ by `npm run schemas`; a test checks the committed files match.
 */
import { z } from 'zod';
import { CHART_IDS } from './model.ts';
import { summarySchema } from './summary-schema.ts';
import { reviewSchema } from './workspace/review-schema.ts';

type Json = Record<string, unknown>;

export function reviewJsonSchema(): Json {
  const s = z.toJSONSchema(reviewSchema, { io: 'input', unrepresentable: 'any' }) as Json;
  // Refinements do not carry over; state in the schema what the reader checks.
  const props = s.properties as Record<string, Json>;
  const period = props.period!.properties as Record<string, Json>;
  for (const k of ['from', 'to']) period[k] = { ...period[k], pattern: '^\\d{4}-\\d{2}-\\d{2}$', description: 'A date written YYYY-MM-DD.' };
  const item = (props.characteristics!.items as Json).properties as Record<string, Json>;
  item.chart = { type: 'string', enum: [...CHART_IDS, 'auto'], description: 'The chart family, or auto for counts.' };
  return { $id: 'https://plumbline.invalid/schemas/review.schema.json', title: 'plumbline review.yaml', ...s };
}

export function summaryJsonSchema(): Json {
  return { $id: 'https://plumbline.invalid/schemas/summary.schema.json', title: 'plumbline summary.json (format 1)', ...(z.toJSONSchema(summarySchema, { unrepresentable: 'any' }) as Json) };
}

export const SCHEMA_FILES: Readonly<Record<string, () => Json>> = {
  'schemas/review.schema.json': reviewJsonSchema,
  'schemas/summary.schema.json': summaryJsonSchema,
};

export const schemaText = (build: () => Json) => `${JSON.stringify(build(), null, 2)}\n`;
