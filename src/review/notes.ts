/**
 * Chart notes: what a reader needs to know about how a chart was drawn and
 * judged — probability limits, a transformation, a median run line, an
 * overdispersion correction, a rate base, a chart chosen automatically —
 * and the low-count warning for c and u charts that cannot show an
 * improvement. Pure; shown under the chart and in summary.json.
 */
import { fmt, fmtAuto } from '../format.ts';
import type { Characteristic, Sample } from '../model.ts';
import type { Baseline } from '../limits/baselines.ts';
import type { ChartFamily, Limits } from '../stats/family.ts';
import type { DispersionCheck } from '../stats/overdispersion.ts';

export interface ChartNotes {
  readonly lines: readonly string[];
  /** Set for a c or u chart whose lower limit is 0 where fewer events are better. */
  readonly lowCounts?: string;
}

export interface NotesInput {
  readonly characteristic: Characteristic;
  readonly family: ChartFamily;
  readonly current: Baseline;
  readonly latest: Limits | null;
  readonly latestSample: Sample | undefined;
  readonly medianRuns: boolean;
  readonly dispersionCheck: DispersionCheck | null;
}

const num = fmtAuto;

export function chartNotes(input: NotesInput): ChartNotes {
  const { characteristic: ch, family: fam, current, latest } = input;
  const est = current.limits?.estimate ?? {};
  const lines: string[] = [];
  if (ch.chosen) lines.push(ch.chosen);

  if (fam.id === 'g' && est.gBar !== undefined && latest) {
    lines.push(
      `Probability limits from the geometric distribution with p̂ = 1/(ḡ + 1) = ${fmt(est.pHat!, 5)} (ḡ = ${num(est.gBar)}): the center line is the median, ${num(latest.center)}, and the limits leave 0.135 % in each tail (Benneyan 2001). ` +
        `The usual 3-sigma upper limit, ḡ + 3√(ḡ(ḡ + 1)), would be ${num(est.ucl3Sigma!)}. Longer gaps mean fewer events: a point above the upper limit is an improvement.`,
    );
  }
  if (fam.id === 't' && est.yBar !== undefined && latest) {
    lines.push(
      `Limits set on y = t^(1/3.6), which makes exponential times nearly symmetric (Nelson 1994), by an individuals chart (ȳ = ${fmt(est.yBar, 4)}, sigma of y ${fmt(est.sigmaY!, 4)}), and carried back to days: center ${num(latest.center)}, limits ${num(latest.lcl)} to ${num(latest.ucl)}. ` +
        'Points are judged on the y scale. Longer gaps mean fewer events: a point above the upper limit is an improvement.',
    );
  }
  if ((fam.id === 'laney-p' || fam.id === 'laney-u') && est.sigmaZ !== undefined) {
    const sz = est.sigmaZ;
    lines.push(
      sz < 1
        ? `σz = ${fmt(sz, 3)} (Laney 2002): the points vary less than the ${fam.id === 'laney-p' ? 'binomial' : 'Poisson'} model allows, so these limits are narrower than the ordinary chart's. Check that the counts are independent and not capped; underdispersion is reported, not floored at 1.`
        : `σz = ${fmt(sz, 3)} (Laney 2002, from the moving ranges of the z-scores): the limits are ${fmt(sz, 2)} times as wide as the ordinary ${fam.id === 'laney-p' ? 'p' : 'u'} chart's, to allow for the variation between periods that very large subgroups reveal.`,
    );
  }
  if (fam.observation === 'rate' && ch.per !== undefined && ch.per !== 1) {
    lines.push(
      `Rates are per ${ch.per.toLocaleString('en-GB')} units of exposure` +
        (ch.per === 200000 ? ': with hours worked as the exposure, the incidence rate of occupational safety statistics (cases × 200,000 / hours worked, US Bureau of Labor Statistics; 100 full-time workers for a year).' : '.'),
    );
  }
  if (input.medianRuns) {
    lines.push(
      (fam.id === 'g' ? 'Gaps between events are skewed' : 'Counts here are small and skewed') +
        ', so same-side runs are judged against each point\'s median under the baseline (not the center line) and counted in probability: a run fires once it is as unlikely as 8 (or 9) points in a row on one side for symmetric data, and a point on the median ends a run.',
    );
  }
  const d = input.dispersionCheck;
  if (d?.recommend) {
    const laney = fam.observation === 'proportion' ? 'laney-p' : 'laney-u';
    lines.push(
      `The points vary far more than the ${fam.observation === 'proportion' ? 'binomial' : 'Poisson'} model allows: dispersion ratio ${fmt(d.ratio, 2)} (chi-square ${fmt(d.chiSquare, 1)} on ${d.df} degrees of freedom, p ${d.p < 0.0001 ? '< 0.0001' : `= ${fmt(d.p, 4)}`}), σz = ${fmt(d.sigmaZ, 2)}. ` +
        `These limits are too tight and many signals will be ordinary variation between periods; use chart: ${laney}, whose limits are σz times wider${fam.id === 'c' ? ' (give the data an exposure column of 1 per period)' : ''}.`,
    );
  } else if (d?.under) {
    lines.push(`The points vary less than the model allows (dispersion ratio ${fmt(d.ratio, 2)}, σz = ${fmt(d.sigmaZ, 2)}); the limits may be too wide. Check that the counts are independent.`);
  }

  let lowCounts: string | undefined;
  if ((fam.id === 'c' || fam.id === 'u') && ch.better !== 'higher' && latest && latest.lcl <= 0 && input.latestSample) {
    const o = input.latestSample.observation;
    const expected = latest.center * (o.kind === 'rate' ? o.exposure : 1);
    lowCounts =
      `With about ${fmt(expected, 1)} events expected a period the lower limit is 0, so a single low period can never signal and an improvement shows only as a run below the median. ` +
      'A g chart (opportunities between events) or a t chart (time between events) can signal an improvement with one long gap: use chart: g or t with event data, or chart: auto.';
    lines.push(lowCounts);
  }
  return { lines, ...(lowCounts ? { lowCounts } : {}) };
}
