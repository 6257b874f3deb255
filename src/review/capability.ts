/**
 * Capability evidence for a variables characteristic with a specification:
 * reported only for a current baseline in statistical control — a process
 * with unexplained signals has no defined capability (Montgomery ISQC ch. 8),
 * so the pack says why the figures are withheld instead. Pure.
 */
import { plural } from '../format.ts';
import type { Characteristic, Sample } from '../model.ts';
import type { Baseline } from '../limits/baselines.ts';
import type { Signal } from '../signals/evaluate.ts';
import { type CapabilityFigures, capability } from '../stats/capability.ts';
import type { ChartFamily } from '../stats/family.ts';
import { type Normality, andersonDarling } from '../stats/normality.ts';

/** Fewer individual values than this make capability figures rough (about 100 values or 25 subgroups: common practice, AIAG from memory). */
export const CAPABILITY_ENOUGH = 100;

export type CapabilityReport =
  | {
      readonly status: 'reported';
      readonly figures: CapabilityFigures;
      readonly normality: Normality | null;
      /** Points (or subgroups) of the baseline the figures rest on. */
      readonly points: number;
      readonly notes: readonly string[];
    }
  | { readonly status: 'withheld'; readonly reason: string };

export interface CapabilityInput {
  readonly characteristic: Characteristic;
  readonly family: ChartFamily;
  readonly samples: readonly Sample[];
  readonly current: Baseline;
  /** Sample indices of the current baseline not excluded. */
  readonly usable: readonly number[];
  readonly signals: readonly Signal[];
  readonly baselineIndex: number;
  readonly label: (i: number) => string;
}

/** Null where capability does not apply: no specification, or not a variables chart. */
export function capabilityReport(input: CapabilityInput): CapabilityReport | null {
  const { characteristic: ch, family: fam, current } = input;
  const spec = ch.spec;
  if (!spec || (spec.lower === undefined && spec.upper === undefined) || fam.standardKind !== 'variables') return null;
  if (!current.limits) return { status: 'withheld', reason: 'The current baseline is still collecting points; capability needs limits first.' };
  const open = input.signals.filter((s) => s.baseline === input.baselineIndex && !s.explained);
  if (open.length > 0) {
    const at = [...new Set(open.flatMap((s) => s.flagged))].sort((a, b) => a - b).slice(0, 5).map((i) => `"${input.label(i)}"`);
    return {
      status: 'withheld',
      reason: `Capability is withheld: the current baseline has unexplained signals (at ${at.join(', ')}${open.length > 5 ? ', …' : ''}). A process that is not in statistical control has no defined capability; explain or remove the special causes first.`,
    };
  }
  // Frozen limits rest on their basis; trial limits and standard values on every usable point.
  const basis = current.source === 'data' ? current.basis : input.usable;
  const slice = input.samples.slice(current.start, current.end);
  const est = fam.fromData(slice, basis.map((i) => i - current.start)).estimate;
  const mean = est.mean ?? est.grandMean;
  const sigma = est.sigma ?? est.sBar;
  if (mean === undefined || sigma === undefined) return null;
  const values = basis.flatMap((i) => {
    const o = input.samples[i]!.observation;
    return o.kind === 'measurements' ? o.values : [];
  });
  const figures = capability(spec, values, mean, sigma);
  if (!figures) return { status: 'withheld', reason: 'Capability cannot be computed: the values show no spread.' };
  const normality = andersonDarling(values);
  const notes: string[] = [];
  if (values.length < CAPABILITY_ENOUGH) {
    notes.push(`The figures rest on ${plural(values.length, 'value')}; with fewer than ${CAPABILITY_ENOUGH} they are rough, as the wide intervals show.`);
  }
  if (normality && !normality.normal) {
    notes.push(
      `The values do not look normal (Anderson–Darling p = ${normality.p < 0.001 ? '< 0.001' : normality.p.toFixed(3)}), so the indices and parts per million, which assume a normal distribution, may mislead; look at the distribution before quoting them.`,
    );
  }
  if (current.source === 'standard') notes.push('Limits come from standard values; the figures use the data of the current baseline.');
  return { status: 'reported', figures, normality, points: basis.length, notes };
}
