/**
 * Do attribute data vary more than the binomial or Poisson model allows?
 * With very large subgroups even ordinary period-to-period variation is far
 * wider than √(p̄(1−p̄)/n) or √(ū/a), and most points land outside limits
 * that are simply too tight (Laney 2002; Spiegelhalter 2005, Qual Saf Health
 * Care 14:347–351).
 *
 * Two measures over the baseline's basis, on z = (x − center)/σᵢ:
 * - the dispersion ratio φ = Σz²/(k − 1), Pearson's chi-square over its
 *   degrees of freedom (1 under the model), with its upper-tail p-value;
 * - Laney's σz = MR̄(z)/1.128, the factor a p′ or u′ chart widens limits by.
 *
 * The Laney chart is recommended when both agree that the limits are
 * visibly too tight: φ is significant at 1 % and σz ≥ 1.25, where ordinary
 * 3-sigma limits sit at 2.4 true sigmas or less and a stable process crosses
 * them about six times as often as it should per point (common practice, no
 * source: the thresholds are ours).
 */
import { chiSquareCdf } from './distributions.ts';
import { sigmaZ } from './laney.ts';

export const RECOMMEND_SIGMA_Z = 1.25;
export const RECOMMEND_P = 0.01;

export interface DispersionCheck {
  /** Points the check rests on. */
  readonly points: number;
  readonly ratio: number;
  readonly chiSquare: number;
  readonly df: number;
  /** P(χ² ≥ observed) under the binomial or Poisson model. */
  readonly p: number;
  readonly sigmaZ: number;
  /** The Laney variant is recommended. */
  readonly recommend: boolean;
  /** σz below 1: the points vary less than the model allows (often counts that are not independent, or a capped measure). */
  readonly under: boolean;
}

/** `z`: the basis points' z-scores against the ordinary model, in order. Null below three points. */
export function checkDispersion(z: readonly number[]): DispersionCheck | null {
  const k = z.length;
  if (k < 3) return null;
  const chiSquare = z.reduce((s, v) => s + v * v, 0);
  const df = k - 1;
  const p = 1 - chiSquareCdf(chiSquare, df);
  const sz = sigmaZ(z);
  return {
    points: k,
    ratio: chiSquare / df,
    chiSquare,
    df,
    p,
    sigmaZ: sz,
    recommend: p < RECOMMEND_P && sz >= RECOMMEND_SIGMA_Z,
    under: sz < 1 && chiSquare / df < 1,
  };
}
