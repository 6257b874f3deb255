/** The chart families by id. */
import type { ChartId } from '../model.ts';
import { c } from './c.ts';
import type { ChartFamily } from './family.ts';
import { individuals } from './individuals.ts';
import { np } from './np.ts';
import { p } from './p.ts';
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
});

export function family(id: ChartId): ChartFamily {
  return FAMILIES[id];
}

export type { ChartFamily, Limits, FamilyLimits } from './family.ts';
