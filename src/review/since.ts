/**
 * Since the last review: what changed between the previous pack's
 * summary.json and this build's — characteristics added or removed, actions
 * that changed, new signals, limits that moved, and ledger rows added. Pure;
 * the previous summary is untrusted input and is read through a schema that
 * accepts any earlier format 1 summary.
 */
import { z } from 'zod';

const point = z.looseObject({ label: z.string(), center: z.number().nullable(), ucl: z.number().nullable(), lcl: z.number().nullable() });
const signal = z.looseObject({ rule: z.string(), panel: z.string(), points: z.array(z.string()), flagged: z.array(z.string()) });
const entry = z.looseObject({ date: z.string(), action: z.string(), point: z.string(), reason: z.string(), by: z.string() });
const characteristic = z.looseObject({
  id: z.string(),
  name: z.string(),
  status: z.string(),
  points: z.array(point),
  signals: z.array(signal),
  recommendation: z.looseObject({ action: z.string() }).nullable(),
  history: z.array(entry).optional(),
});
export const previousSummarySchema = z.looseObject({
  format: z.literal(1),
  asOf: z.string(),
  period: z.looseObject({ from: z.string(), to: z.string() }),
  characteristics: z.array(characteristic),
});

export type SummaryLike = z.infer<typeof previousSummarySchema>;

type PointLike = z.infer<typeof point>;
type EntryLike = z.infer<typeof entry>;

/**
 * What a record is cut from: a parsed summary, or this build's summary
 * object, whose point lists are made on demand (LazyList) and are only read
 * by position here.
 */
export interface RecordSource {
  readonly format: 1;
  readonly asOf: string;
  readonly period: { readonly from: string; readonly to: string };
  readonly characteristics: readonly {
    readonly id: string;
    readonly name: string;
    readonly status: string;
    readonly points: { readonly length: number; at(i: number): PointLike | undefined };
    readonly signals: readonly { readonly rule: string; readonly panel: string; readonly points: readonly string[]; readonly flagged: readonly string[] }[];
    readonly recommendation: { readonly action: string } | null;
    readonly history?: readonly EntryLike[] | undefined;
  }[];
}

/** The pack file holding a build's comparison record. */
export const RECORD_FILE = 'record.json';

/**
 * What the next build compares with, cut from a summary: for each
 * characteristic its status, action, signals, ledger history and the last
 * point that has limits (the only point the comparison reads). It is itself
 * a summary as the comparison reads one. A plant's summary.json is tens of
 * megabytes and a million-point one hundreds; reading it back whole made
 * the next month's build slower and larger than the first.
 */
export function comparisonRecord(summary: RecordSource): SummaryLike {
  return recordOf(summary, summary.characteristics.map(recordItem));
}

/** One characteristic of the comparison record: what `compareSummaries` reads of it. */
export type RecordItem = SummaryLike['characteristics'][number];

/** The comparison record of a summary, from its characteristics' items (`recordItem`), in order. */
export function recordOf(summary: Pick<RecordSource, 'format' | 'asOf' | 'period'>, characteristics: readonly RecordItem[]): SummaryLike {
  return { format: summary.format, asOf: summary.asOf, period: { from: summary.period.from, to: summary.period.to }, characteristics: [...characteristics] };
}

export function recordItem(c: RecordSource['characteristics'][number]): RecordItem {
  const last = lastLimits(c);
  return {
    id: c.id,
    name: c.name,
    status: c.status,
    points: last ? [{ label: last.label, center: last.center, ucl: last.ucl, lcl: last.lcl }] : [],
    signals: c.signals.map((s) => ({ rule: s.rule, panel: s.panel, points: [...s.points], flagged: [...s.flagged] })),
    recommendation: c.recommendation ? { action: c.recommendation.action } : null,
    ...(c.history ? { history: c.history.map((e) => ({ date: e.date, action: e.action, point: e.point, reason: e.reason, by: e.by })) } : {}),
  };
}

export interface LimitMove {
  readonly id: string;
  readonly name: string;
  readonly limit: 'center' | 'ucl' | 'lcl';
  readonly before: number;
  readonly after: number;
}

export interface SinceReport {
  readonly previous: { readonly asOf: string; readonly period: { readonly from: string; readonly to: string } };
  readonly added: readonly { id: string; name: string }[];
  readonly removed: readonly { id: string; name: string }[];
  readonly actions: readonly { id: string; name: string; before: string; after: string }[];
  readonly signals: readonly { id: string; name: string; rule: string; panel: string; points: readonly string[] }[];
  readonly limits: readonly LimitMove[];
  readonly ledger: readonly { id: string; name: string; date: string; action: string; point: string; reason: string; by: string }[];
  /** The previous summary carried no ledger history (built before it was recorded). */
  readonly historyUnknown: boolean;
}

const actionOf = (c: z.infer<typeof characteristic>) => (c.status === 'assessed' ? (c.recommendation?.action ?? 'keep') : 'cannot be assessed');
const lastLimits = (c: Pick<RecordSource['characteristics'][number], 'points'>) => {
  for (let i = c.points.length - 1; i >= 0; i--) {
    const p = c.points.at(i)!;
    if (p.center !== null) return p;
  }
  return undefined;
};

export function compareSummaries(previous: SummaryLike, current: SummaryLike): SinceReport {
  const before = new Map(previous.characteristics.map((c) => [c.id, c]));
  const now = new Map(current.characteristics.map((c) => [c.id, c]));
  const added = current.characteristics.filter((c) => !before.has(c.id)).map((c) => ({ id: c.id, name: c.name }));
  const removed = previous.characteristics.filter((c) => !now.has(c.id)).map((c) => ({ id: c.id, name: c.name }));
  const actions: SinceReport['actions'][number][] = [];
  const signals: SinceReport['signals'][number][] = [];
  const limits: LimitMove[] = [];
  const ledger: SinceReport['ledger'][number][] = [];
  let historyUnknown = false;
  for (const c of current.characteristics) {
    const p = before.get(c.id);
    if (!p) continue;
    if (actionOf(p) !== actionOf(c)) actions.push({ id: c.id, name: c.name, before: actionOf(p), after: actionOf(c) });
    const key = (s: z.infer<typeof signal>) => `${s.rule}|${s.panel}|${s.points[0] ?? ''}`;
    const seen = new Set(p.signals.map(key));
    for (const s of c.signals) if (!seen.has(key(s))) signals.push({ id: c.id, name: c.name, rule: s.rule, panel: s.panel, points: s.flagged });
    const a = lastLimits(p);
    const b = lastLimits(c);
    if (a && b) {
      for (const limit of ['center', 'ucl', 'lcl'] as const) {
        const x = a[limit]!;
        const y = b[limit]!;
        if (Math.abs(y - x) > 1e-9 * Math.max(1, Math.abs(x))) limits.push({ id: c.id, name: c.name, limit, before: x, after: y });
      }
    }
    if (!p.history) {
      historyUnknown = true;
      continue;
    }
    const had = new Set(p.history.map((e) => `${e.date}|${e.action}|${e.point}|${e.reason}|${e.by}`));
    for (const e of c.history ?? []) {
      if (!had.has(`${e.date}|${e.action}|${e.point}|${e.reason}|${e.by}`)) ledger.push({ id: c.id, name: c.name, date: e.date, action: e.action, point: e.point, reason: e.reason, by: e.by });
    }
  }
  return { previous: { asOf: previous.asOf, period: previous.period }, added, removed, actions, signals, limits, ledger, historyUnknown };
}
