import { quantilesBySelection } from './select.js';

/** An equal-tailed band of draws: median and the (1 − level)/2 and (1 + level)/2 quantiles. */
export interface Band {
  readonly median: number;
  readonly low: number;
  readonly high: number;
}

/**
 * Equal-tailed band of a sample: the (1 − level)/2, 0.5 and (1 + level)/2 quantiles by linear
 * interpolation between order statistics (Hyndman & Fan 1996, type 7 — the default of R and
 * numpy). Reorders `sample` in place.
 */
export function bandOf(sample: Float64Array, level: number): Band & { mean: number } {
  const tail = (1 - level) / 2;
  let sum = 0;
  for (let i = 0; i < sample.length; i++) sum += sample[i]!;
  const [low, median, high] = quantilesBySelection(sample, [tail, 0.5, 1 - tail]) as [number, number, number];
  return { median, low, high, mean: sum / sample.length };
}

/**
 * Band of whole numbers (steps, years) that stays on the whole numbers: the inverse of the
 * empirical distribution function (Hyndman & Fan 1996, type 1), so a median year is a year that
 * occurred in some draw, never 2031.5. Sorts `sample` in place.
 */
export function discreteBandOf(sample: Int32Array, level: number): Band {
  sample.sort();
  const tail = (1 - level) / 2;
  const at = (p: number): number => sample[Math.max(0, Math.ceil(p * sample.length) - 1)]!;
  return { median: at(0.5), low: at(tail), high: at(1 - tail) };
}
