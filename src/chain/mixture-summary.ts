import betaCdf from '@stdlib/stats-base-dists-beta-cdf';
import betaQuantile from '@stdlib/stats-base-dists-beta-quantile';
import type { PosteriorSummary } from './estimates.js';

/** Bisection stops when the bracket of a quantile is narrower than this (far below the printed 3 digits). */
const QUANTILE_TOLERANCE = 1e-9;

/**
 * Exact marginal summaries of the posterior with pairs further apart than one step: an equal-weight
 * mixture over the sampler's retained sweeps r of row-wise Dirichlet(α + n + latentᵣ), so each cell
 * is a mixture of Beta(aᵣ, bᵣ) (estimates.ts for one component). Mean: the mean of the component
 * means. Equal-tailed bounds: the mixture CDF, the mean of the Beta CDFs, inverted by bisection
 * between the smallest and largest component quantile (the mixture's lies between them). No
 * sampling, so the same retained sweeps always give the same summary. Components with the same
 * (a, b) — common when few pairs touch a row — are evaluated once with their weight.
 */
export function mixturePosteriorSummary(counts: Float64Array, alpha: Float64Array, k: number, level: number,
  latent: Float64Array, retained: number): PosteriorSummary {
  const mean = new Float64Array(k * k);
  const low = new Float64Array(k * k);
  const high = new Float64Array(k * k);
  const tail = (1 - level) / 2;
  const totals = new Float64Array(retained * k);
  for (let r = 0; r < retained; r++) {
    for (let c = 0; c < k * k; c++) {
      if (alpha[c]! > 0) totals[r * k + Math.floor(c / k)] += alpha[c]! + counts[c]! + latent[r * k * k + c]!;
    }
  }
  for (let c = 0; c < k * k; c++) {
    if (alpha[c] === 0) continue;
    const i = Math.floor(c / k);
    const weights = new Map<string, { a: number; b: number; w: number }>();
    for (let r = 0; r < retained; r++) {
      const a = alpha[c]! + counts[c]! + latent[r * k * k + c]!;
      const b = totals[r * k + i]! - a;
      const key = `${a},${b}`;
      const entry = weights.get(key);
      if (entry) entry.w += 1;
      else weights.set(key, { a, b, w: 1 });
    }
    const parts = [...weights.values()];
    let m = 0;
    for (const { a, b, w } of parts) m += w * a / (a + b);
    mean[c] = m / retained;
    if (parts.every(({ b }) => b === 0)) {
      low[c] = high[c] = 1; // the row's only possible destination
      continue;
    }
    const cdf = (x: number): number => {
      let s = 0;
      for (const { a, b, w } of parts) s += w * (b === 0 ? (x >= 1 ? 1 : 0) : betaCdf(x, a, b));
      return s / retained;
    };
    const quantile = (p: number): number => {
      let lo = 1;
      let hi = 0;
      for (const { a, b } of parts) {
        const q = b === 0 ? 1 : betaQuantile(p, a, b);
        lo = Math.min(lo, q);
        hi = Math.max(hi, q);
      }
      while (hi - lo > QUANTILE_TOLERANCE) {
        const mid = (lo + hi) / 2;
        if (cdf(mid) < p) lo = mid;
        else hi = mid;
      }
      return (lo + hi) / 2;
    };
    low[c] = quantile(tail);
    high[c] = quantile(1 - tail);
  }
  return { mean, low, high, level };
}
