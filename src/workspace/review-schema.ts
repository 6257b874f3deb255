/** The schema of review.yaml. Defaults here are the documented ones. */
import { z } from 'zod';
import { CHART_IDS } from '../model.ts';
import { RULE_IDS, RULE_SETS } from '../signals/rule-sets.ts';
import { isIsoDate } from './dates.ts';

const isoDate = z.string({ error: 'must be a date written YYYY-MM-DD' }).refine(isIsoDate, { error: 'must be a real date written YYYY-MM-DD' });
const finite = z.number({ error: 'must be a number' }).refine(Number.isFinite, { error: 'must be a finite number' });

const chart = z.string({ error: 'must be a chart family name' }).superRefine((v, ctx) => {
  if ((CHART_IDS as readonly string[]).includes(v) || v === 'auto') return;
  ctx.addIssue({ code: 'custom', message: `"${v}" is not a chart family; use one of ${CHART_IDS.join(', ')}, or auto for counts` });
});

/** A data file's delimiter and decimal mark; a comma cannot be both. */
const csvFormat = z
  .strictObject({
    delimiter: z.enum([',', ';', '\t', '|'], { error: 'must be one of "," ";" "\\t" "|"' }).optional(),
    decimal: z.enum(['.', ','], { error: 'must be "." or ","' }).optional(),
  })
  .optional();

export const characteristicSchema = z.strictObject({
  id: z.string({ error: 'must be text' }).regex(/^[a-z0-9-]+$/, { error: 'may hold only lower-case letters, digits and hyphens' }),
  name: z.string({ error: 'must be text' }).min(1, { error: 'must not be empty' }),
  chart,
  data: z.string({ error: 'must be a path relative to the workspace' }).min(1, { error: 'must not be empty' }),
  unit: z.string({ error: 'must be text' }).default(''),
  better: z.enum(['higher', 'lower', 'target'], { error: 'must be higher, lower or target' }),
  spec: z
    .strictObject({ lower: finite.optional(), upper: finite.optional(), target: finite.optional() })
    .refine((s) => s.lower === undefined || s.upper === undefined || s.lower < s.upper, {
      error: 'lower must be below upper',
    })
    .optional(),
  standard: z.strictObject({ center: finite, sigma: finite.optional() }).optional(),
  safety: z.boolean({ error: 'must be true or false' }).default(false),
  tags: z.array(z.string({ error: 'must be text' }), { error: 'must be a list of tags' }).default([]),
  csv: csvFormat,
  per: z.number({ error: 'must be a number' }).refine((v) => Number.isFinite(v) && v > 0, { error: 'must be a number above 0' }).optional(),
});

export const reviewSchema = z.strictObject({
  title: z.string({ error: 'must be text' }).min(1, { error: 'must not be empty' }),
  organisation: z.string({ error: 'must be text' }).default(''),
  period: z.strictObject(
    { from: isoDate, to: isoDate },
    { error: 'must give from and to as dates written YYYY-MM-DD' },
  ),
  rules: z
    .union([
      z.enum(Object.keys(RULE_SETS) as ['western-electric', 'nelson']),
      z.array(z.enum(RULE_IDS as [string, ...string[]])).min(1),
    ], { error: `must be western-electric, nelson, or a list of rule ids from: ${RULE_IDS.join(', ')}` })
    .default('western-electric'),
  minPoints: z.number({ error: 'must be a whole number' }).int({ error: 'must be a whole number' }).min(2, { error: 'must be at least 2' }).default(5),
  freezeAfter: z.number({ error: 'must be a whole number' }).int({ error: 'must be a whole number' }).min(2, { error: 'must be at least 2' }).default(20),
  csv: csvFormat,
  customers: z
    .record(z.string(), z.string({ error: 'must be the name to print on that customer\'s pack' }).min(1, { error: 'must not be empty' }), {
      error: 'must map tags to customer names, e.g. "harbour-market: Harbour Market Ltd"',
    })
    .default({}),
  characteristics: z.array(characteristicSchema, { error: 'must be a list of characteristics' }).min(1, { error: 'must list at least one characteristic' }),
});

export type ReviewFile = z.infer<typeof reviewSchema>;
