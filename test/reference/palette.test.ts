/**
 * Chart colours come from the Okabe–Ito palette (M. Okabe and K. Ito, "Color
 * Universal Design (CUD): how to make figures and presentations that are
 * friendly to colorblind people", 2008). The eight values below are quoted
 * from memory of that publication; everything else drawn is a neutral grey.
 */
import { describe, expect, it } from 'vitest';
import * as style from '../../src/render/scene/style.ts';

const OKABE_ITO = {
  black: '#000000',
  orange: '#e69f00',
  'sky blue': '#56b4e9',
  'bluish green': '#009e73',
  yellow: '#f0e442',
  blue: '#0072b2',
  vermillion: '#d55e00',
  'reddish purple': '#cc79a7',
};
const isGrey = (hex: string) => hex.slice(1, 3) === hex.slice(3, 5) && hex.slice(3, 5) === hex.slice(5, 7);

describe('the chart palette', () => {
  it('uses only Okabe–Ito colours and greys', () => {
    const used = [style.SERIES, style.CENTER, style.ZONE, style.PERIOD, style.INK, style.MUTED, style.GRID, style.WHITE, style.CHANGE.paint, ...Object.values(style.RULE_MARKERS).map((m) => m.fill)];
    for (const c of used) expect(Object.values(OKABE_ITO).includes(c) || isGrey(c), c).toBe(true);
  });
  it('tells rules apart by shape: rules of different patterns never share a marker shape', () => {
    const byShape = new Map<string, string[]>();
    for (const [id, m] of Object.entries(style.RULE_MARKERS)) byShape.set(m.shape, [...(byShape.get(m.shape) ?? []), id]);
    // The only shared shape is the run rule's two lengths (8 or 9 points), which a rule set never uses together.
    expect([...byShape.values()].filter((ids) => ids.length > 1)).toEqual([['run-8-one-side', 'run-9-one-side']]);
  });
});
