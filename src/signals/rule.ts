/**
 * A rule reads one baseline's points in order, each reduced to its z-score
 * (distance from the center line in its own sigma) and whether it lies beyond
 * its limits, and reports where it fires. Conventions (REFERENCE §3, adopted
 * and documented in README): a point exactly on the center line is on neither
 * side and ends a same-side run; "beyond kσ" is strict; equal consecutive
 * values break trends and alternation; a run keeps firing while it lasts.
 */
export type Side = 'above' | 'below';

export interface RulePoint {
  /** (statistic − center) / sigma at this point; ±Infinity when sigma is 0 and the point is off the line. */
  readonly z: number;
  /** Strictly above the upper or below the lower control limit (limits already truncated where they apply). */
  readonly beyond: Side | null;
  /**
   * Where same-side runs are judged against the median of a skewed count
   * distribution: the point's side of that median and the chance of that
   * side (src/signals/median-line.ts). Absent: the side of the center line,
   * each side counting one half.
   */
  readonly run?: { readonly side: Side | null; readonly p: number };
}

export interface RuleHit {
  /** Position (in the sequence given) where the rule fires. */
  readonly at: number;
  /** Position of the first point of the pattern that made it fire. */
  readonly start: number;
  /** The side the pattern points to, or null for patterns without one (alternation, stratification, mixture). */
  readonly side: Side | null;
}

export type RuleGroup = 'limits' | 'zone' | 'run';

export interface Rule {
  readonly id: string;
  /** What the rule looks for, as a sentence for the pack. */
  readonly description: string;
  /** A few words for chart legends, e.g. "beyond limits". */
  readonly short: string;
  /** Zone rules assume near-normal symmetric data and are off by default on attribute charts. */
  readonly group: RuleGroup;
  detect(points: readonly RulePoint[]): RuleHit[];
}

export function sideOf(z: number): Side | null {
  return z > 0 ? 'above' : z < 0 ? 'below' : null;
}

/** The side a same-side run counts the point on: of the median where one is given, else of the center line. */
export function runSideOf(p: RulePoint): Side | null {
  return p.run ? p.run.side : sideOf(p.z);
}
