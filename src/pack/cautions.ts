/**
 * Cautions that depend on the charts in use, added under the general ones
 * for the safety-related and incident-count characteristics (REFERENCE §7).
 * Pure mdast.
 */
import type { RootContent } from 'mdast';
import type { Brief } from './brief.ts';
import { GAP_CHARTS } from '../stats/index.ts';
import { list, paragraph, strong, type Inline } from './mdast.ts';

export function chartCautionBlocks(flagged: readonly Pick<Brief, 'chart' | 'cautions'>[]): RootContent[] {
  const charts = new Set(flagged.map((b) => b.chart));
  const items: Inline[][] = [];
  if ([...charts].some((c) => GAP_CHARTS.has(c))) {
    items.push([
      strong('Gaps between events.'),
      ' A g or t chart rewards long gaps, but one event resets the gap and a long quiet stretch does not prove that a risk has gone: it may reflect less exposure, fewer people on the task, or events not reported. Read a gap with the hours or units behind it.',
    ]);
  }
  if (flagged.some((b) => b.cautions?.perRate)) {
    items.push([
      strong('Incidence rates.'),
      ' Rates per 200,000 hours worked follow the US Bureau of Labor Statistics convention (100 full-time workers for a year); other jurisdictions and companies use other bases, such as 1,000,000 hours, and other case definitions. Compare rates only on the same base and the same definition, and read each with its interval: a rate from few hours is very uncertain.',
    ]);
  }
  if (flagged.some((b) => b.cautions?.lowCounts)) {
    items.push([
      strong('Few events a period.'),
      ' Where the lower limit is 0 a single good period proves nothing and an improvement shows only as a run below the median; a quiet month is not evidence of a safer workplace. Aggregating to quarters, or charting the gaps between events, shows changes sooner.',
    ]);
  }
  return items.length ? [paragraph('For the kinds of chart used here:'), list(items)] : [];
}
