/**
 * Axis ticks. Values get "nice" steps (1, 2 or 5 × 10^k). Dates get calendar
 * ticks at the first point of each day, week, month, quarter or year —
 * the finest that the data spacing and the label widths allow — so the axis
 * reads naturally and no two labels overlap.
 */
import type { IsoDate } from '../../model.ts';

export interface ValueTicks {
  readonly values: readonly number[];
  readonly decimals: number;
}

/** `integer` keeps ticks on whole numbers, for counts. */
export function niceTicks(lo: number, hi: number, wanted: number, integer = false): ValueTicks {
  const span = hi - lo;
  const raw = span / Math.max(1, wanted);
  const power = 10 ** Math.floor(Math.log10(raw));
  // The finest nice step that gives at most one tick more than wanted.
  const candidates = [0.5, 1, 2, 2.5, 5, 10, 20].map((m) => m * power).filter((s) => !integer || (s >= 1 && Number.isInteger(s)));
  const step = candidates.find((s) => span / s <= wanted + 1) ?? candidates[candidates.length - 1]!;
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9) + (Math.abs(step / 10 ** Math.floor(Math.log10(step) + 1e-9) - 2.5) < 1e-9 ? 1 : 0));
  const values: number[] = [];
  const first = Math.ceil(lo / step - 1e-9);
  for (let k = first; k * step <= hi + step * 1e-9; k++) values.push(Number((k * step).toFixed(decimals)));
  return { values, decimals };
}

export interface DateTick {
  readonly index: number;
  readonly label: string;
}

type Level = 'day' | 'week' | 'month' | 'quarter' | 'year';
const LEVELS: readonly Level[] = ['day', 'week', 'month', 'quarter', 'year'];
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

function parts(d: IsoDate): { y: number; m: number; day: number; serial: number } {
  const y = Number(d.slice(0, 4));
  const m = Number(d.slice(5, 7));
  const day = Number(d.slice(8, 10));
  return { y, m, day, serial: Date.UTC(y, m - 1, day) / 86_400_000 };
}

function keyOf(d: IsoDate, level: Level): string {
  const p = parts(d);
  switch (level) {
    case 'day':
      return d;
    case 'week': {
      // Weeks start on Monday (ISO 8601); 1970-01-01 was a Thursday.
      const monday = p.serial - ((p.serial + 3) % 7);
      return String(monday);
    }
    case 'month':
      return d.slice(0, 7);
    case 'quarter':
      return `${p.y}-Q${Math.ceil(p.m / 3)}`;
    case 'year':
      return String(p.y);
  }
}

function labelOf(d: IsoDate, level: Level, first: boolean, previous: IsoDate | undefined): string {
  const p = parts(d);
  const newYear = first || previous === undefined || previous.slice(0, 4) !== d.slice(0, 4);
  switch (level) {
    case 'day':
    case 'week':
      return newYear ? `${p.day} ${MONTHS[p.m - 1]} ${p.y}` : `${p.day} ${MONTHS[p.m - 1]}`;
    case 'month':
      return newYear ? `${MONTHS[p.m - 1]} ${p.y}` : MONTHS[p.m - 1]!;
    case 'quarter':
      return newYear ? `Q${Math.ceil(p.m / 3)} ${p.y}` : `Q${Math.ceil(p.m / 3)}`;
    case 'year':
      return String(p.y);
  }
}

function daysIntoPeriod(d: IsoDate, level: Level): number {
  const p = parts(d);
  const startOf = (y: number, m: number) => Date.UTC(y, m - 1, 1) / 86_400_000;
  switch (level) {
    case 'day':
      return 0;
    case 'week':
      return (p.serial + 3) % 7;
    case 'month':
      return p.day - 1;
    case 'quarter':
      return p.serial - startOf(p.y, 3 * Math.floor((p.m - 1) / 3) + 1);
    case 'year':
      return p.serial - startOf(p.y, 1);
  }
}

/** Typical days between points: the median gap, ignoring repeated dates. */
function typicalGap(dates: readonly IsoDate[]): number {
  const gaps: number[] = [];
  for (let i = 1; i < dates.length; i++) {
    const g = parts(dates[i]!).serial - parts(dates[i - 1]!).serial;
    if (g > 0) gaps.push(g);
  }
  if (gaps.length === 0) return 1;
  gaps.sort((a, b) => a - b);
  return gaps[Math.floor(gaps.length / 2)]!;
}

/**
 * Calendar ticks for points at `x(i)`. Starts at the level the spacing
 * suggests and coarsens until every label fits with `gap` points between
 * neighbours; at the coarsest level, labels that would collide are dropped.
 */
export function dateTicks(dates: readonly IsoDate[], x: (i: number) => number, width: (label: string) => number, gap = 8): DateTick[] {
  if (dates.length === 0) return [];
  const spacing = typicalGap(dates);
  const start = spacing >= 80 ? 3 : spacing >= 25 ? 2 : spacing >= 5 ? 1 : 0;
  for (let l = start; l < LEVELS.length; l++) {
    const level = LEVELS[l]!;
    const ticks: DateTick[] = [];
    let previousKey: string | undefined;
    let previousDate: IsoDate | undefined;
    dates.forEach((d, i) => {
      const key = keyOf(d, level);
      if (key === previousKey) return;
      previousKey = key;
      // A first point well inside its month (or week, quarter, year) would
      // wear a label that reads as the start of that period; skip it.
      if (i === 0 && daysIntoPeriod(d, level) >= Math.max(1, spacing)) return;
      ticks.push({ index: i, label: labelOf(d, level, ticks.length === 0, previousDate) });
      previousDate = d;
    });
    const fits = ticks.every((t, k) => {
      const next = ticks[k + 1];
      return !next || x(next.index) - x(t.index) >= (width(t.label) + width(next.label)) / 2 + gap;
    });
    if (fits || l === LEVELS.length - 1) return fits ? ticks : thin(ticks, x, width, gap);
  }
  return [];
}

function thin(ticks: readonly DateTick[], x: (i: number) => number, width: (label: string) => number, gap: number): DateTick[] {
  const kept: DateTick[] = [];
  let right = -Infinity;
  for (const t of ticks) {
    const half = width(t.label) / 2;
    if (x(t.index) - half >= right + gap) {
      kept.push(t);
      right = x(t.index) + half;
    }
  }
  return kept;
}
