import { bandsInto } from './band-kernel.js';

/** An equal-tailed band of draws: median and the (1 − level)/2 and (1 + level)/2 quantiles. */
export interface Band {
  readonly median: number;
  readonly low: number;
  readonly high: number;
}

/**
 * Equal-tailed band of a sample: the (1 − level)/2, 0.5 and (1 + level)/2 quantiles by linear
 * interpolation between order statistics (Hyndman & Fan 1996, type 7 — the default of R and
 * numpy), the same numbers, bit for bit, as d3-array's `quantileSorted` on the sorted sample
 * (tested), and the mean. Leaves `sample` as it was. Computed in the WebAssembly band kernel
 * (band-kernel.ts), exactly; many columns at once go through `bandsInto`.
 */
export function bandOf(sample: Float64Array, level: number): Band & { mean: number } {
  const out = new Float64Array(4);
  bandsInto(sample, sample.length, level, out);
  return { median: out[0]!, low: out[1]!, high: out[2]!, mean: out[3]! };
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
