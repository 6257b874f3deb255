/**
 * `chart: auto` for counts: a c or u chart while counts are high enough for
 * its lower limit to be above 0, otherwise a g chart of the exposure between
 * events. Pure: from samples read as counts to the samples of the chosen chart.
 *
 * A c or u chart's lower limit is above 0 only when the expected count per
 * period exceeds 9 (c̄ − 3√c̄ > 0, REFERENCE §1.3). Below that a single low
 * period can never signal, so an improvement shows only as a run; a g chart
 * can signal one with a single long gap.
 */
import { fmt } from '../format.ts';
import type { Better, Characteristic, Sample } from '../model.ts';

/** Expected count per period above which a c or u chart's lower limit is above 0. */
export const LOWER_LIMIT_COUNT = 9;

const FLIP: Readonly<Record<Better, Better>> = { lower: 'higher', higher: 'lower', target: 'target' };

export interface Choice {
  readonly characteristic: Characteristic;
  readonly samples: Sample[];
}

/** `ch` is the characteristic as read (chart c or u); `samples` its counts. */
export function chooseCountChart(ch: Characteristic, samples: readonly Sample[], through?: string): Choice {
  const counts = samples.map((s) => (s.observation.kind === 'count' || s.observation.kind === 'rate' ? s.observation.count : 0));
  // Decide on the points up to the end of the review period, so later data cannot change this review.
  const decided = samples.map((s, i) => (through === undefined || s.date <= through ? counts[i]! : null)).filter((c): c is number => c !== null);
  const total = decided.reduce((a, b) => a + b, 0);
  const perPeriod = decided.length ? total / decided.length : 0;
  const family = ch.chart === 'u' ? 'u chart' : 'c chart';
  if (perPeriod > LOWER_LIMIT_COUNT || total < 2) {
    const why =
      total < 2
        ? `${total === 0 ? 'no events yet' : 'one event so far'}, too few to measure gaps between events`
        : `about ${fmt(perPeriod, 1)} events a period, enough for the lower limit to be above 0`;
    return { characteristic: { ...ch, chosen: `chart: auto chose a ${family}: ${why}.` }, samples: [...samples] };
  }

  // Place each period's events evenly over its exposure (or over the period
  // itself for plain counts), then measure from one event to the next.
  const scale = ch.chart === 'u' ? (ch.per ?? 1) : 1;
  const out: Sample[] = [];
  let start = 0;
  let previous: number | undefined;
  samples.forEach((s, i) => {
    const k = counts[i]!;
    const width = s.observation.kind === 'rate' ? s.observation.exposure * scale : 1;
    for (let j = 1; j <= k; j++) {
      const at = start + (width * (j - 0.5)) / k;
      if (previous !== undefined) {
        out.push({
          label: j === 1 ? s.label : `${s.label} #${j}`,
          date: s.date,
          line: s.line,
          observation: { kind: 'gap', between: Number((at - previous).toFixed(6)) },
        });
      }
      previous = at;
    }
    start += width;
  });
  const unit = ch.chart === 'u' ? 'exposure between events' : 'periods between events';
  const { per: _per, ...rest } = ch;
  return {
    characteristic: {
      ...rest,
      chart: 'g',
      unit,
      better: FLIP[ch.better],
      chosen:
        `chart: auto chose a g chart: about ${fmt(perPeriod, 2)} events a period, so a ${family}'s lower limit would be 0 and a single period could never show an improvement. ` +
        `The g chart plots the ${ch.chart === 'u' ? 'exposure' : 'number of periods'} from one event to the next, with a period's events spread evenly over it; longer gaps are better.`,
    },
    samples: out,
  };
}
