/** The chart families by id. */
import type { ChartId } from '../model.ts';
import { c } from './c.ts';
import type { ChartFamily } from './family.ts';
import { g } from './g.ts';
import { individuals } from './individuals.ts';
import { laneyP, laneyU } from './laney.ts';
import { np } from './np.ts';
import { p } from './p.ts';
import { t } from './t.ts';
import { u } from './u.ts';
import { xbarR } from './xbar-r.ts';
import { xbarS } from './xbar-s.ts';

export const FAMILIES: Readonly<Record<ChartId, ChartFamily>> = Object.freeze({
  individuals,
  'xbar-r': xbarR,
  'xbar-s': xbarS,
  p,
  np,
  c,
  u,
  'laney-p': laneyP,
  'laney-u': laneyU,
  g,
  t,
});

export function family(id: ChartId): ChartFamily {
  return FAMILIES[id];
}

/** Rare-event families: the gaps between events are plotted, so longer is better. */
export const GAP_CHARTS: ReadonlySet<ChartId> = new Set(['g', 't']);

export type { ChartFamily, CountModel, Limits, FamilyLimits } from './family.ts';
