import { orderStatistics } from './order-statistics.js';

/** An equal-tailed band of draws: median and the (1 − level)/2 and (1 + level)/2 quantiles. */
export interface Band {
  readonly median: number;
  readonly low: number;
  readonly high: number;
}

/**
 * Equal-tailed band of a sample: the (1 − level)/2, 0.5 and (1 + level)/2 quantiles by linear
 * interpolation between order statistics (Hyndman & Fan 1996, type 7 — the default of R and
 * numpy). Leaves `sample` as it was. One pass gives the sum, the smallest and the largest value;
 * the order statistics of all three quantiles then come from one bucket count
 * (`order-statistics.ts`).
 */
export function bandOf(sample: Float64Array, level: number): Band & { mean: number } {
  const tail = (1 - level) / 2;
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < sample.length; i++) {
    const x = sample[i]!;
    sum += x;
    if (x < min) min = x;
    if (x > max) max = x;
  }
  const [low, median, high] = type7Quantiles(sample, [tail, 0.5, 1 - tail], min, max) as [number, number, number];
  return { median, low, high, mean: sum / sample.length };
}

/**
 * Type-7 quantiles (Hyndman & Fan 1996) at each probability, computed as d3-array's
 * `quantileSorted` computes them on the sorted sample — x₍ᵢ₎ + (x₍ᵢ₊₁₎ − x₍ᵢ₎)·(h − i) with
 * h = (n − 1)p, i = ⌊h⌋; the smallest value for p ≤ 0 or n = 1, the largest for p ≥ 1 — so the
 * results are the same numbers, bit for bit (tested). `min` and `max` are the sample's extremes.
 * (Where (n − 1)p rounds up to n − 1 for some p < 1, d3 reads past the end and returns NaN; here
 * the upper order statistic is clamped to the largest value.)
 */
export function type7Quantiles(sample: Float64Array, probabilities: readonly number[], min: number, max: number): number[] {
  const n = sample.length;
  if (n === 0) throw new Error('quantiles of an empty sample');
  const below = (p: number): number => (p <= 0 || n < 2 ? 0 : p >= 1 ? n - 1 : Math.floor((n - 1) * p));
  const ranks = new Set<number>();
  for (const p of probabilities) {
    const i = below(p);
    ranks.add(i);
    if (p > 0 && p < 1 && n > 1) ranks.add(Math.min(i + 1, n - 1));
  }
  const wanted = [...ranks].sort((a, b) => a - b);
  const values = orderStatistics(sample, wanted, min, max);
  const at = (rank: number): number => values[wanted.indexOf(rank)]!;
  return probabilities.map((p) => {
    const i = below(p);
    if (p <= 0 || p >= 1 || n < 2) return at(i);
    const v0 = at(i);
    return v0 + (at(Math.min(i + 1, n - 1)) - v0) * ((n - 1) * p - i);
  });
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
