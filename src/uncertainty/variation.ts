import type { Fit } from '../fit/fit.js';
import { fitMask, fitPrior } from '../fit/fit.js';
import { informativePeriods, rowPeriods } from '../chain/row-periods.js';
import { sampleRowConcentration } from './concentration.js';
import type { RandomStream } from './random.js';

/**
 * How much each year's matrix differs from the drawn one (README, "Year-to-year variation"):
 * none (today's chain), estimated from the record, or concentrations given per state.
 */
export type VariationSpec =
  | { readonly kind: 'none' }
  | { readonly kind: 'estimated' }
  /** Per state κ; Infinity: that row does not vary. */
  | { readonly kind: 'given'; readonly concentration: Float64Array };

/**
 * Why a row's concentration is what it is. Rows without variation: `one-cell` (its only possible
 * transition is fixed), `never-left` (the record never saw the state leave: how often it leaves
 * already rests on the prior, and a spread the record cannot show would rest on the prior too),
 * `few-counts` (fewer than MIN_INFORMATIVE_PERIODS periods with two or more transitions from it:
 * one transition a period cannot tell a year's row from the mean row), `no-periods` (a fit file
 * without per-period counts).
 */
export type RowVariationStatus = 'estimated' | 'given' | 'one-cell' | 'never-left' | 'few-counts' | 'no-periods';

export interface RowVariation {
  readonly state: number;
  readonly status: RowVariationStatus;
  /** Posterior draws of κ (estimated rows), in sampler order; empty otherwise. */
  readonly kappa: Float64Array;
  /** Posterior draws of the mean row, full k wide, `mean[s*k + j]` (estimated rows); empty otherwise. */
  readonly mean: Float64Array;
  /** Periods with two or more transitions from the state. */
  readonly informativePeriods: number;
}

/** Survey periods a record needs before `variation: estimated` is the default (and allowed at all). */
export const MIN_VARIATION_PERIODS = 3;
/** Periods with two or more transitions a row needs before its spread between years is estimated. */
export const MIN_INFORMATIVE_PERIODS = 3;
/** Posterior samples of (κ, mean row) kept per row; draw d uses sample d mod this. */
export const VARIATION_SAMPLES = 1000;

/** The record's periods with any transition: `variation: estimated` is the default from three on. */
export function periodCount(fit: Fit): number {
  return (fit.periods ?? []).filter((p) => p.cells.some(([, , n]) => n > 0)).length;
}

/**
 * Each row's year-to-year variation: sampled (concentration.ts) for the rows the record can say
 * something about, each row from its own sub-stream `row:i` of `random`.
 */
export function estimateVariation(fit: Fit, random: RandomStream): RowVariation[] {
  const k = fit.states.length;
  const mask = fitMask(fit);
  const prior = fitPrior(fit);
  return fit.states.map((_, i) => {
    const none = (status: RowVariationStatus, informative = 0): RowVariation =>
      ({ state: i, status, kappa: new Float64Array(0), mean: new Float64Array(0), informativePeriods: informative });
    if (!fit.periods) return none('no-periods');
    const r = rowPeriods(fit.periods, mask, k, i);
    const informative = informativePeriods(r);
    if (r.cells.length < 2) return none('one-cell', informative);
    let left = 0;
    for (let j = 0; j < k; j++) if (j !== i) left += fit.counts[i * k + j]!;
    if (informative < MIN_INFORMATIVE_PERIODS) return none('few-counts', informative);
    if (left === 0) return none('never-left', informative);
    const alpha = Array.from(r.cells, (j) => prior[i * k + j]!);
    const samples = sampleRowConcentration(r, alpha, VARIATION_SAMPLES, random.stream(`row:${i}`));
    const mean = new Float64Array(VARIATION_SAMPLES * k);
    const m = r.cells.length;
    for (let s = 0; s < VARIATION_SAMPLES; s++) r.cells.forEach((j, c) => { mean[s * k + j] = samples.mean[s * m + c]!; });
    return { state: i, status: 'estimated', kappa: samples.kappa, mean, informativePeriods: informative };
  });
}
