import { bandOf, type Band } from './quantiles.js';

/**
 * Per state, the band over draws of (alternative − baseline) share from two sets of mixes of one
 * step, `[s*D + d]`: the horizon row of a comparison chart, whether or not the horizon is among the
 * shown years. Both come from the same comparison, so draw d is the same matrix draw in each.
 */
export function differenceAt(base: Float64Array, alt: Float64Array, k: number, level: number): Band[] {
  const draws = base.length / k;
  const column = new Float64Array(draws);
  return Array.from({ length: k }, (_, s) => {
    for (let d = 0; d < draws; d++) column[d] = alt[s * draws + d]! - base[s * draws + d]!;
    const { median, low, high } = bandOf(column, level);
    return { median, low, high };
  });
}
