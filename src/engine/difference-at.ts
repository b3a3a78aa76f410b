import { bandOf, type Band } from './quantiles.js';
import { drawIndex, type DrawLayout } from './layout.js';

/**
 * Per state, the band over draws of (alternative − baseline) share at one recorded step: the
 * horizon row of a comparison chart, whether or not the horizon is among the shown years.
 * Both layouts come from the same comparison, so draw d is the same matrix draw in each.
 */
export function differenceAt(layout: DrawLayout, base: Float64Array, alt: Float64Array, row: number, k: number, level: number): Band[] {
  const column = new Float64Array(layout.draws);
  return Array.from({ length: k }, (_, s) => {
    for (let d = 0; d < layout.draws; d++) {
      const at = drawIndex(layout, d, row, s);
      column[d] = alt[at]! - base[at]!;
    }
    const { median, low, high } = bandOf(column, level);
    return { median, low, high };
  });
}
