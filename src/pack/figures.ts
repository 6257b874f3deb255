/**
 * The per-characteristic figures beyond limits and signals: chart notes,
 * capability, rates with exact intervals, and the one-cell key figure the
 * overview shows. Pure mdast builders for src/pack/content.ts.
 */
import type { RootContent } from 'mdast';
import type { Assessed } from '../analyse.ts';
import { fmt, fmtAuto, plural } from '../format.ts';
import type { Index } from '../stats/capability.ts';
import { heading, list, paragraph, strong, table } from './mdast.ts';

const num = fmtAuto;
const idx = (i: Index | null) => (i ? fmt(i.value, 2) : '–');
const interval = (i: Index | null) => (i ? `${fmt(i.interval[0], 2)} to ${fmt(i.interval[1], 2)}` : '–');
const ppm = (v: number) => (v < 0.05 ? '< 0.1' : v < 10 ? fmt(v, 1) : fmt(v, 0));
const perText = (per: number) => (per === 1 ? 'per unit of exposure' : `per ${per.toLocaleString('en-GB')}`);

export function notesBlocks(a: Assessed): RootContent[] {
  return a.notes.lines.length ? [paragraph(strong('Chart notes')), list(a.notes.lines.map((l) => [l]))] : [];
}

export function capabilityBlocks(a: Assessed): RootContent[] {
  const c = a.capability;
  if (!c) return [];
  if (c.status === 'withheld') return [heading(3, undefined, 'Capability'), paragraph(c.reason)];
  const f = c.figures;
  const n = a.characteristic.chart === 'individuals' ? 'point' : 'subgroup';
  const ad = c.normality;
  return [
    heading(3, undefined, 'Capability'),
    table(
      ['Index', 'Estimate', '95% interval', 'Sigma used'],
      [
        ['Cp', idx(f.cp), interval(f.cp), `within, ${num(f.sigmaWithin)}`],
        ['Cpk', idx(f.cpk), interval(f.cpk), `within, ${num(f.sigmaWithin)}`],
        ['Pp', idx(f.pp), interval(f.pp), `overall, ${num(f.sigmaOverall)}`],
        ['Ppk', idx(f.ppk), interval(f.ppk), `overall, ${num(f.sigmaOverall)}`],
      ],
      [null, 'right', 'right', null],
    ),
    paragraph(
      `On ${plural(f.values, 'value')} (${plural(c.points, n)} of the current baseline, no unexplained signal), mean ${num(f.mean)}. ` +
        `Expected outside the specification, from the normal model: ${ppm(f.ppmWithin)} parts per million with the within sigma, ${ppm(f.ppmOverall)} with the overall sigma. ` +
        (ad ? `Normality: Anderson–Darling A* = ${fmt(ad.adjusted, 3)}, p ${ad.p < 0.001 ? '< 0.001' : `= ${fmt(ad.p, 3)}`}${ad.normal ? ', no evidence against a normal distribution' : ', not normal at the 5 % level'}. ` : 'Normality: too few values to test. ') +
        'Cp and Pp intervals from the chi-square distribution with N − 1 degrees of freedom (Montgomery); Cpk and Ppk intervals by Bissell\'s normal approximation (1990), approximate.',
    ),
    ...(c.notes.length ? [list(c.notes.map((x) => [x]))] : []),
  ];
}

export function rateBlocks(a: Assessed, inPeriod: ReadonlySet<number>): RootContent[] {
  const r = a.rates;
  if (!r) return [];
  const rows = [...inPeriod].sort((x, y) => x - y).map((i) => {
    const p = r.points[i]!;
    return [a.samples[i]!.label, String(p.count), num(p.exposure), fmt(p.rate, 3), `${fmt(p.interval[0], 3)} to ${fmt(p.interval[1], 3)}`];
  });
  const b = r.baseline;
  return [
    heading(3, undefined, 'Rates'),
    paragraph(
      `Events ${perText(r.per)} units of exposure, each with its exact Poisson (Garwood) 95% interval` +
        (b ? `. The current baseline: ${plural(b.count, 'event')} in ${num(b.exposure)} units, ${fmt(b.rate, 3)} (${fmt(b.interval[0], 3)} to ${fmt(b.interval[1], 3)}).` : '.') +
        ' A rate from little exposure is very uncertain: read it with its interval.',
    ),
    ...(rows.length ? [table(['Point', 'Events', 'Exposure', 'Rate', '95% interval'], rows, [null, 'right', 'right', 'right', 'right'])] : []),
  ];
}

/** The one figure the overview shows beside the action: capability, a rate, or the dispersion verdict. */
export function keyFigure(a: Assessed): string {
  const c = a.capability;
  if (c?.status === 'reported') return `Cpk ${fmt(c.figures.cpk.value, 2)} (${fmt(c.figures.cpk.interval[0], 2)}–${fmt(c.figures.cpk.interval[1], 2)})`;
  if (c?.status === 'withheld') return 'capability withheld';
  if (a.rates?.baseline) {
    const b = a.rates.baseline;
    return `rate ${fmt(b.rate, 2)} (${fmt(b.interval[0], 2)}–${fmt(b.interval[1], 2)}) ${perText(a.rates.per)}`;
  }
  if (a.dispersionCheck?.recommend) return `overdispersed, σz ${fmt(a.dispersionCheck.sigmaZ, 1)}`;
  const sz = a.baselines[a.baselines.length - 1]?.limits?.estimate.sigmaZ;
  if (sz !== undefined) return `σz ${fmt(sz, 2)}`;
  return '–';
}
