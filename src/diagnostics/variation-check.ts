import { concentrationMle } from '../chain/concentration-mle.js';
import { rowPeriods } from '../chain/row-periods.js';
import { fitMask, type Fit } from '../fit/fit.js';
import type { RandomStream } from '../uncertainty/random.js';
import { estimateVariation, MIN_VARIATION_PERIODS, periodCount, type RowVariationStatus } from '../uncertainty/variation.js';
import { bandOf, type Band } from '../engine/quantiles.js';

export interface RowVariationCheck {
  readonly status: RowVariationStatus;
  /** Posterior median and band of κ (estimated rows), else null. */
  readonly kappa: Band | null;
  /** The maximum-likelihood κ (Minka's fixed point; Infinity when the periods agree no more than chance allows), estimated rows only. */
  readonly mle: number | null;
  readonly informativePeriods: number;
}

/**
 * How alike the years are, row by row, as a forecast with `variation: estimated` would take it:
 * the posterior of κ (variation.ts, the same sampler and rules) and, beside it, its maximum.
 * Null when the record has fewer than MIN_VARIATION_PERIODS survey periods.
 */
export function variationCheck(fit: Fit, level: number, random: RandomStream): RowVariationCheck[] | null {
  if (periodCount(fit) < MIN_VARIATION_PERIODS) return null;
  const mask = fitMask(fit);
  const k = fit.states.length;
  return estimateVariation(fit, random).map((row) => {
    if (row.status !== 'estimated') return { status: row.status, kappa: null, mle: null, informativePeriods: row.informativePeriods };
    const b = bandOf(row.kappa, level);
    const mle = concentrationMle(rowPeriods(fit.periods!, mask, k, row.state)).kappa;
    return { status: row.status, kappa: { median: b.median, low: b.low, high: b.high }, mle, informativePeriods: row.informativePeriods };
  });
}
