/**
 * Runs a panel's rules over each baseline and turns their hits into signals:
 * episodes with the points involved, classed fleeting or persistent, and
 * marked explained where the ledger says a cause was looked for.
 */
import type { Limits } from '../stats/index.ts';
import type { RunSide } from './median-line.ts';
import type { Rule, RuleHit, RulePoint, Side } from './rule.ts';
import { runSideOf } from './rule.ts';

export type Panel = 'location' | 'dispersion';
export type Persistence = 'fleeting' | 'persistent';

export interface Signal {
  readonly rule: string;
  readonly panel: Panel;
  /** Index of the baseline the signal belongs to. */
  readonly baseline: number;
  readonly side: Side | null;
  /** Sample indices from the first point of the pattern through the last point where the rule fired. */
  readonly points: readonly number[];
  /** Sample indices where the rule fired. */
  readonly flagged: readonly number[];
  readonly persistence: Persistence;
  /** A reviewed or exclude entry names one of `points`. */
  readonly explained: boolean;
}

/** Persistent: from the pattern's first point to the baseline's latest, at least this many points… */
export const PERSISTENT_MIN_POINTS = 8;
/** …and at least this share of them on the signalled side. */
export const PERSISTENT_SHARE = 0.8;

export interface PanelSeries {
  /** Plotted value per sample, null where the panel has none (the first moving range). */
  readonly values: readonly (number | null)[];
  /** Limits per sample, null where the baseline has none yet. */
  readonly limits: readonly (Limits | null)[];
  /** Where same-side runs are judged against a skewed count's median: each point's side of it. */
  readonly runSide?: (index: number) => RunSide | undefined;
}

export function zScore(value: number, l: Limits): number {
  // Limits set on a transformed scale are judged there: sigma is a sigma of y.
  const t = l.transform;
  const d = t ? value ** t.exponent - l.center ** t.exponent : value - l.center;
  if (l.sigma > 0) return d / l.sigma;
  return d === 0 ? 0 : d > 0 ? Infinity : -Infinity;
}

export function rulePoint(value: number, l: Limits, run?: RunSide): RulePoint {
  return {
    z: zScore(value, l),
    beyond: value > l.ucl ? 'above' : value < l.lcl ? 'below' : null,
    ...(run ? { run: { side: run.side, p: run.p } } : {}),
  };
}

/** Merge a rule's hits into episodes: a hit joins the previous one when its pattern starts no later than just after it. */
function episodes(rule: Rule, hits: readonly RuleHit[]): { start: number; flagged: number[]; side: Side | null }[] {
  const out: { start: number; flagged: number[]; side: Side | null }[] = [];
  for (const h of [...hits].sort((a, b) => a.at - b.at)) {
    const last = out.at(-1);
    // Each point beyond the limits is its own signal, so each can be reviewed on its own.
    if (last && rule.id !== 'beyond-limits' && last.side === h.side && h.start <= last.flagged.at(-1)! + 1) {
      last.flagged.push(h.at);
      last.start = Math.min(last.start, h.start);
    } else {
      out.push({ start: h.start, flagged: [h.at], side: h.side });
    }
  }
  return out;
}

export function evaluatePanel(
  panel: Panel,
  series: PanelSeries,
  baselines: readonly { start: number; end: number }[],
  rules: readonly Rule[],
  isExplained: (index: number) => boolean,
): Signal[] {
  const signals: Signal[] = [];
  baselines.forEach((b, k) => {
    const seq: number[] = [];
    const points: RulePoint[] = [];
    for (let i = b.start; i < b.end; i++) {
      const v = series.values[i];
      const l = series.limits[i];
      if (v === null || v === undefined || !l) continue;
      seq.push(i);
      points.push(rulePoint(v, l, series.runSide?.(i)));
    }
    // Points on each side from position i to the baseline's end, so each signal's persistence is one lookup.
    const above = new Int32Array(points.length + 1);
    const below = new Int32Array(points.length + 1);
    for (let i = points.length - 1; i >= 0; i--) {
      const side = runSideOf(points[i]!);
      above[i] = above[i + 1]! + (side === 'above' ? 1 : 0);
      below[i] = below[i + 1]! + (side === 'below' ? 1 : 0);
    }
    // Persistent when the level moved and stayed: from the pattern's first point to the baseline's
    // latest there are at least 8 points, at least 80 % of them on the signalled side. Patterns
    // without a side (alternation, stratification, mixture) describe spread, not level: fleeting.
    const persistence = (start: number, side: Side | null): Persistence => {
      if (side === null) return 'fleeting';
      const tail = points.length - start;
      if (tail < PERSISTENT_MIN_POINTS) return 'fleeting';
      const onSide = side === 'above' ? above[start]! : below[start]!;
      return onSide >= PERSISTENT_SHARE * tail ? 'persistent' : 'fleeting';
    };
    for (const rule of rules) {
      for (const ep of episodes(rule, rule.detect(points))) {
        const involved = seq.slice(ep.start, ep.flagged.at(-1)! + 1);
        signals.push({
          rule: rule.id,
          panel,
          baseline: k,
          side: ep.side,
          points: involved,
          flagged: ep.flagged.map((p) => seq[p]!),
          persistence: persistence(ep.start, ep.side),
          explained: involved.some(isExplained),
        });
      }
    }
  });
  return signals.sort((a, b) => a.flagged[0]! - b.flagged[0]! || a.rule.localeCompare(b.rule));
}
