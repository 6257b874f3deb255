/**
 * Where did the level change? The maximum-likelihood estimate of a single
 * change point in a baseline:
 *
 * - normal mean with common variance: minimise the pooled within-segment sum
 *   of squares (Hinkley 1970, Biometrika 57:1–17; the same split as Taylor's
 *   CUSUM method with its mean-squared-error estimator);
 * - Poisson rate with exposures and binomial proportion: maximise the
 *   segment-wise likelihood (Page 1955, Biometrika 42:523–527; Worsley 1986,
 *   Biometrika 73:91–104).
 *
 * The interval holds the split points whose profile likelihood is within the
 * χ²₁ 95 % cut-off (3.84) of the best, a likelihood-ratio confidence set in
 * the manner of Siegmund (1988, International Statistical Review 56:31–48;
 * cited from memory). Significance is a permutation test of the maximum
 * likelihood-ratio statistic (the reordering test Taylor's method uses):
 * the share of 999 seeded reorderings whose statistic is strictly below the
 * observed one (REFERENCE §8: "<").
 *
 * Given the confidence its caller decides at, the test is curtailed: it
 * stops as soon as so many reorderings have reached the observed statistic
 * that the share below could no longer reach that confidence, even if every
 * remaining one fell below. The decision is then the one all 999 would give
 * (curtailed sampling, common practice for sequential tests; the idea of
 * stopping a Monte Carlo test early is Besag & Clifford 1991, Biometrika
 * 78:301–304, cited from memory). A clearly unremarkable shift costs tens of
 * reorderings instead of 999.
 */
import { seeded, shuffleValues } from './random.ts';

export type ChangeSeries =
  | { readonly kind: 'normal'; readonly values: readonly number[] }
  | { readonly kind: 'poisson'; readonly counts: readonly number[]; readonly exposures: readonly number[] }
  | { readonly kind: 'binomial'; readonly defectives: readonly number[]; readonly inspected: readonly number[] };

export interface ChangePointEstimate {
  /** Position (in the series given) of the first point of the new level. */
  readonly at: number;
  /** First and last plausible positions of the first new point. */
  readonly interval: readonly [number, number];
  /** Level before and after: mean, rate per unit of exposure, or proportion. */
  readonly before: number;
  readonly after: number;
  /** Likelihood-ratio statistic of one change against none. */
  readonly lr: number;
  /** Share of reorderings with a smaller statistic: the confidence that a change happened. */
  readonly significance: number;
  /** Reorderings drawn: `planned`, or fewer when the test was curtailed. */
  readonly permutations: number;
  /** Reorderings the test would draw in full: 999, fewer for long series (`permutationsFor`). */
  readonly planned: number;
  readonly method: string;
}

export const CHANGE_POINT_METHOD = 'maximum-likelihood change point (Hinkley 1970; Page 1955 and Worsley 1986 for counts), likelihood-ratio interval, permutation significance';

const CUT = 3.841_458_820_694_124; // χ²₁ 0.95 quantile
const PERMUTATIONS = 999;
/**
 * Reorderings × points the test may spend: 999 reorderings up to 5,000
 * points, fewer beyond (never below 99), so a long series costs seconds, not
 * minutes. The confidence then resolves to 1/reorderings, and says so.
 */
const BUDGET = 5_000_000;
export const permutationsFor = (n: number) => Math.max(99, Math.min(PERMUTATIONS, Math.floor(BUDGET / n)));

interface Profile {
  /** ℓ(m) for a split with first new point m, m = 1 … n − 1 (index 0 unused: −Infinity). */
  readonly loglik: number[];
  readonly null: number;
  readonly level: (from: number, to: number) => number;
}

const xlogy = (x: number, y: number) => (x === 0 ? 0 : x * Math.log(y));

function profileOf(s: ChangeSeries, order: readonly number[]): Profile {
  const n = order.length;
  const loglik = new Array<number>(n).fill(-Infinity);
  if (s.kind === 'normal') {
    const x = order.map((i) => s.values[i]!);
    const cum = [0];
    const cum2 = [0];
    for (const v of x) cum.push(cum[cum.length - 1]! + v), cum2.push(cum2[cum2.length - 1]! + v * v);
    const sse = (a: number, b: number) => {
      const k = b - a;
      const sum = cum[b]! - cum[a]!;
      return Math.max(0, cum2[b]! - cum2[a]! - (sum * sum) / k);
    };
    // Profile likelihood with a common variance: −(n/2) ln(SSE/n); tiny floor keeps a perfect split finite.
    const ll = (e: number) => (-n / 2) * Math.log(Math.max(e, 1e-300) / n);
    for (let m = 2; m <= n - 2; m++) loglik[m] = ll(sse(0, m) + sse(m, n));
    return { loglik, null: ll(sse(0, n)), level: (a, b) => (cum[b]! - cum[a]!) / (b - a) };
  }
  const [num, den] = s.kind === 'poisson' ? [s.counts, s.exposures] : [s.defectives, s.inspected];
  const c = [0];
  const e = [0];
  for (const i of order) c.push(c[c.length - 1]! + num[i]!), e.push(e[e.length - 1]! + den[i]!);
  const seg = (a: number, b: number) => {
    const k = c[b]! - c[a]!;
    const t = e[b]! - e[a]!;
    const rate = k / t;
    return s.kind === 'poisson' ? xlogy(k, rate) - k : xlogy(k, rate) + xlogy(t - k, 1 - rate);
  };
  for (let m = 1; m <= n - 1; m++) loglik[m] = seg(0, m) + seg(m, n);
  return { loglik, null: seg(0, n), level: (a, b) => (c[b]! - c[a]!) / (e[b]! - e[a]!) };
}

/**
 * The series' values in one or two typed arrays, which the permutation test
 * shuffles in place: shuffling the values with the swaps that would shuffle
 * an index order gives the same sequence without the indirection.
 */
interface Shuffled {
  readonly kind: ChangeSeries['kind'];
  /** Values, counts or defectives. */
  readonly x: Float64Array;
  /** Exposures or inspected; empty for normal values. */
  readonly w: Float64Array;
}

function shuffledOf(s: ChangeSeries): Shuffled {
  if (s.kind === 'normal') return { kind: s.kind, x: Float64Array.from(s.values), w: new Float64Array(0) };
  const [num, den] = s.kind === 'poisson' ? [s.counts, s.exposures] : [s.defectives, s.inspected];
  return { kind: s.kind, x: Float64Array.from(num), w: Float64Array.from(den) };
}

/**
 * `best(profileOf(s, order)).lr` for the order `p` now holds, without
 * building the profile: the same arithmetic in the same order, so the same
 * number, but no arrays or closures per call. The permutation test calls it
 * up to 999 times a series, and a plant has a thousand series. For normal
 * data the largest ℓ(m) is the one of the smallest split SSE, since ℓ falls
 * as SSE grows.
 */
function permutedLr(p: Shuffled, a: Float64Array, b: Float64Array): number {
  const n = p.x.length;
  const { x, w } = p;
  a[0] = 0;
  b[0] = 0;
  if (p.kind === 'normal') {
    for (let k = 0; k < n; k++) {
      const v = x[k]!;
      a[k + 1] = a[k]! + v;
      b[k + 1] = b[k]! + v * v;
    }
    const ll = (e: number) => (-n / 2) * Math.log(Math.max(e, 1e-300) / n);
    const total = a[n]!;
    const total2 = b[n]!;
    let least = Infinity;
    for (let m = 2; m <= n - 2; m++) {
      const s1 = a[m]!;
      const e1 = Math.max(0, b[m]! - (s1 * s1) / m);
      const s2 = total - s1;
      const e2 = Math.max(0, total2 - b[m]! - (s2 * s2) / (n - m));
      const e = Math.max(e1 + e2, 1e-300);
      if (e < least) least = e;
    }
    const nullE = Math.max(0, total2 - (total * total) / n);
    return least === Infinity ? -Infinity : 2 * (ll(least) - ll(nullE));
  }
  for (let k = 0; k < n; k++) {
    a[k + 1] = a[k]! + x[k]!;
    b[k + 1] = b[k]! + w[k]!;
  }
  const poisson = p.kind === 'poisson';
  const seg = (k: number, t: number) => {
    const rate = k / t;
    return poisson ? xlogy(k, rate) - k : xlogy(k, rate) + xlogy(t - k, 1 - rate);
  };
  let most = -Infinity;
  for (let m = 1; m <= n - 1; m++) {
    const l = seg(a[m]!, b[m]!) + seg(a[n]! - a[m]!, b[n]! - b[m]!);
    if (l > most) most = l;
  }
  return 2 * (most - seg(a[n]!, b[n]!));
}

function best(p: Profile): { at: number; lr: number } {
  let at = -1;
  for (let m = 0; m < p.loglik.length; m++) if (at < 0 || p.loglik[m]! > p.loglik[at]!) at = m;
  return { at, lr: 2 * (p.loglik[at]! - p.null) };
}

function lengthOf(s: ChangeSeries): number {
  return s.kind === 'normal' ? s.values.length : s.kind === 'poisson' ? s.counts.length : s.defectives.length;
}

/**
 * Null when the series is too short to split (fewer than 4 normal values or
 * 2 counts). With `decideAt`, the permutation test stops once the
 * significance can no longer reach it (see the header); without, it draws
 * every planned reordering.
 */
export function estimateChangePoint(s: ChangeSeries, seed = 1, decideAt?: number): ChangePointEstimate | null {
  const n = lengthOf(s);
  if (n < (s.kind === 'normal' ? 4 : 2)) return null;
  const identity = Array.from({ length: n }, (_, i) => i);
  const profile = profileOf(s, identity);
  const { at, lr } = best(profile);
  if (!Number.isFinite(profile.loglik[at]!)) return null;
  const plausible = profile.loglik.map((l, m) => (2 * (profile.loglik[at]! - l) <= CUT ? m : -1)).filter((m) => m >= 0);
  const next = seeded(seed);
  let below = 0;
  const values = shuffledOf(s);
  const planned = permutationsFor(n);
  const scratch = [new Float64Array(n + 1), new Float64Array(n + 1)] as const;
  let drawn = 0;
  // The best share the full test could still reach is (planned − reached)/planned, computed with the
  // division the full test's own share uses, so stopping never changes which side of decideAt it falls.
  const hopeless = (reached: number) => decideAt !== undefined && (planned - reached) / planned < decideAt;
  while (drawn < planned && !hopeless(drawn - below)) {
    shuffleValues(values.x, values.w, next);
    drawn++;
    if (permutedLr(values, ...scratch) < lr) below++;
  }
  return {
    at,
    interval: [plausible[0]!, plausible[plausible.length - 1]!],
    before: profile.level(0, at),
    after: profile.level(at, n),
    lr,
    significance: below / drawn,
    permutations: drawn,
    planned,
    method: CHANGE_POINT_METHOD,
  };
}
