/** The rules by id and the named rule sets. */
import type { RuleSetName } from '../model.ts';
import type { Rule } from './rule.ts';
import { alternating14 } from './rules/alternating.ts';
import { beyondLimits } from './rules/beyond-limits.ts';
import { fourOfFiveBeyond1Sigma, twoOfThreeBeyond2Sigma } from './rules/k-of-m-beyond.ts';
import { run8OneSide, run9OneSide } from './rules/run-one-side.ts';
import { trend6 } from './rules/trend.ts';
import { mixture8, stratification15 } from './rules/zone-c.ts';

export const RULES: readonly Rule[] = [
  beyondLimits,
  twoOfThreeBeyond2Sigma,
  fourOfFiveBeyond1Sigma,
  run8OneSide,
  run9OneSide,
  trend6,
  alternating14,
  stratification15,
  mixture8,
];

export const RULE_IDS: readonly string[] = RULES.map((r) => r.id);

const byId = new Map(RULES.map((r) => [r.id, r]));

export function rule(id: string): Rule | undefined {
  return byId.get(id);
}

/** Western Electric's four zone rules (Statistical Quality Control Handbook, 1956) and Nelson's eight tests (JQT 1984). */
export const RULE_SETS: Readonly<Record<RuleSetName, readonly string[]>> = {
  'western-electric': ['beyond-limits', 'two-of-three-beyond-2-sigma', 'four-of-five-beyond-1-sigma', 'run-8-one-side'],
  nelson: [
    'beyond-limits',
    'run-9-one-side',
    'trend-6',
    'alternating-14',
    'two-of-three-beyond-2-sigma',
    'four-of-five-beyond-1-sigma',
    'stratification-15-within-1-sigma',
    'mixture-8-beyond-1-sigma',
  ],
};

export type PanelKind = 'variables' | 'attributes' | 'dispersion';

/**
 * The rules that run on one panel. Dispersion panels (moving range, range,
 * SD) use the limits rule only: their points are correlated or skewed, and
 * runs on them are not interpreted. Attribute charts drop the zone rules when
 * a named set is chosen (they assume near-normal, symmetric data); an
 * explicit list of rule ids applies as written.
 */
export function rulesFor(choice: RuleSetName | readonly string[], panel: PanelKind): Rule[] {
  if (panel === 'dispersion') return [beyondLimits];
  const named = typeof choice === 'string';
  const ids = named ? RULE_SETS[choice] : choice;
  return ids
    .map((id) => byId.get(id))
    .filter((r): r is Rule => r !== undefined)
    .filter((r) => !(named && panel === 'attributes' && r.group === 'zone'));
}
