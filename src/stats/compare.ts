/**
 * Did a recorded change work? Two-sample comparisons of the points before a
 * change with the points after it:
 *
 * - means (variables): Welch's t-test (Welch 1947, Biometrika 34:28–35), with
 *   the Welch–Satterthwaite degrees of freedom;
 * - rates (counts with exposure): the exact conditional test — given the total
 *   count, the count after the change is binomial with p = A₂/(A₁+A₂) under
 *   equal rates (Przyborowski & Wileński 1940) — with the exact interval for
 *   the rate ratio from the Clopper–Pearson interval of that binomial;
 * - proportions: Fisher's exact test (two-sided, minimum likelihood), with the
 *   Agresti–Caffo interval for the difference (Agresti & Caffo 2000, The
 *   American Statistician 54:280–288).
 *
 * Each also says, when the difference is not yet significant, roughly how many
 * more periods like the ones after the change a test of 5 % two-sided size
 * would need to detect a difference of the size seen, with 80 % power
 * (normal approximation; null where no number of periods would do).
 */
import { binomialPmf, clopperPearson, hypergeometricPmf, minLikelihoodUnimodalP, normalQuantile, studentTCdf, studentTQuantile } from './distributions.ts';

export interface Comparison {
  readonly method: 'welch-t' | 'exact-poisson-rates' | 'fisher-exact';
  /** Level before and after: mean, rate per unit of exposure, or proportion. */
  readonly before: number;
  readonly after: number;
  /** Periods (plotted points) on each side. */
  readonly periodsBefore: number;
  readonly periodsAfter: number;
  /** after − before for means and proportions; after / before for rates. */
  readonly effect: { readonly kind: 'difference' | 'ratio'; readonly value: number; readonly interval: readonly [number, number] };
  readonly p: number;
  /** More periods after the change that would typically be needed, or null when significant already or out of reach. */
  readonly morePeriods: number | null;
}

const ALPHA = 0.05;
/** z(0.975) + z(0.80): the standard error a difference must shrink to for 80 % power at 5 % two-sided. */
const POWER_Z = normalQuantile(0.975) + normalQuantile(0.8);

const mean = (xs: readonly number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;
const variance = (xs: readonly number[], m: number) => xs.reduce((s, x) => s + (x - m) ** 2, 0) / (xs.length - 1);

/**
 * More periods after the change so that `seOf(extra)` falls to |effect| / POWER_Z;
 * `seOf` must fall as `extra` grows. Null when even a thousand times as many would not do.
 */
function periodsFor(effect: number, seOf: (extra: number) => number, have: number): number | null {
  if (!(Math.abs(effect) > 0) || !Number.isFinite(effect)) return null;
  const target = Math.abs(effect) / POWER_Z;
  if (seOf(0) <= target) return 0;
  if (seOf(have * 1000) > target) return null;
  let lo = 0;
  let hi = have * 1000;
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (seOf(mid) <= target) hi = mid;
    else lo = mid;
  }
  return hi;
}

export function welch(before: readonly number[], after: readonly number[]): Comparison {
  const n1 = before.length;
  const n2 = after.length;
  const m1 = mean(before);
  const m2 = mean(after);
  const v1 = variance(before, m1);
  const v2 = variance(after, m2);
  const se = Math.sqrt(v1 / n1 + v2 / n2);
  const df = (v1 / n1 + v2 / n2) ** 2 / ((v1 / n1) ** 2 / (n1 - 1) + (v2 / n2) ** 2 / (n2 - 1));
  const diff = m2 - m1;
  const t = se > 0 ? diff / se : diff === 0 ? 0 : Infinity * Math.sign(diff);
  const p = se > 0 ? 2 * (1 - studentTCdf(Math.abs(t), df)) : diff === 0 ? 1 : 0;
  const half = se > 0 ? studentTQuantile(0.975, df) * se : 0;
  return {
    method: 'welch-t',
    before: m1,
    after: m2,
    periodsBefore: n1,
    periodsAfter: n2,
    effect: { kind: 'difference', value: diff, interval: [diff - half, diff + half] },
    p,
    morePeriods: p < ALPHA ? null : periodsFor(diff, (k) => Math.sqrt(v1 / n1 + v2 / (n2 + k)), n2),
  };
}

export function poissonRates(
  before: { readonly count: number; readonly exposure: number; readonly periods: number },
  after: { readonly count: number; readonly exposure: number; readonly periods: number },
): Comparison {
  const n = before.count + after.count;
  const share = after.exposure / (before.exposure + after.exposure);
  const p = n === 0 ? 1 : minLikelihoodUnimodalP((k) => binomialPmf(k, n, share), 0, n, Math.min(n, Math.floor((n + 1) * share)), after.count);
  const r1 = before.count / before.exposure;
  const r2 = after.count / after.exposure;
  const odds = (q: number) => (q >= 1 ? Infinity : q / (1 - q));
  const [lo, hi] = n === 0 ? [0, Infinity] : clopperPearson(after.count, n);
  const scale = before.exposure / after.exposure;
  // On the log scale the rate ratio's variance is about 1/C₁ + 1/C₂; half a count stands in for none.
  const c1 = Math.max(before.count, 0.5);
  const c2 = Math.max(after.count, 0.5);
  return {
    method: 'exact-poisson-rates',
    before: r1,
    after: r2,
    periodsBefore: before.periods,
    periodsAfter: after.periods,
    effect: { kind: 'ratio', value: r1 > 0 ? r2 / r1 : Infinity, interval: [odds(lo) * scale, odds(hi) * scale] },
    p,
    morePeriods:
      p < ALPHA ? null : periodsFor(Math.log(c2 / after.exposure / (c1 / before.exposure)), (k) => Math.sqrt(1 / c1 + 1 / (c2 * (1 + k / after.periods))), after.periods),
  };
}

export function proportions(
  before: { readonly defectives: number; readonly inspected: number; readonly periods: number },
  after: { readonly defectives: number; readonly inspected: number; readonly periods: number },
): Comparison {
  const d = before.defectives + after.defectives;
  const total = before.inspected + after.inspected;
  const lo = Math.max(0, after.inspected - (total - d));
  const hi = Math.min(d, after.inspected);
  const mode = Math.min(hi, Math.max(lo, Math.floor(((after.inspected + 1) * (d + 1)) / (total + 2))));
  const p = minLikelihoodUnimodalP((k) => hypergeometricPmf(k, d, total - d, after.inspected), lo, hi, mode, after.defectives);
  const p1 = before.defectives / before.inspected;
  const p2 = after.defectives / after.inspected;
  const t1 = (before.defectives + 1) / (before.inspected + 2);
  const t2 = (after.defectives + 1) / (after.inspected + 2);
  const half = normalQuantile(0.975) * Math.sqrt((t1 * (1 - t1)) / (before.inspected + 2) + (t2 * (1 - t2)) / (after.inspected + 2));
  const perPeriod = after.inspected / after.periods;
  return {
    method: 'fisher-exact',
    before: p1,
    after: p2,
    periodsBefore: before.periods,
    periodsAfter: after.periods,
    effect: { kind: 'difference', value: p2 - p1, interval: [t2 - t1 - half, t2 - t1 + half] },
    p,
    morePeriods:
      p < ALPHA ? null : periodsFor(p2 - p1, (k) => Math.sqrt((t1 * (1 - t1)) / before.inspected + (t2 * (1 - t2)) / (after.inspected + k * perPeriod)), after.periods),
  };
}

export const SIGNIFICANCE = ALPHA;
