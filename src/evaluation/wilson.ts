import chisquareQuantile from '@stdlib/stats-base-dists-chisquare-quantile';

/**
 * The Wilson score interval for a binomial proportion, x successes in n trials (Wilson 1927,
 * "Probable inference, the law of succession, and statistical inference", JASA 22:209–212).
 * Chosen over the textbook Wald interval because it stays inside [0, 1] and does not collapse to
 * a point when x is 0 or n — a state seen on no plot in a survey is not known to be absent.
 * z is the two-sided normal quantile of `level`, taken exactly as √χ²₁(level).
 */
export function wilsonInterval(x: number, n: number, level: number): { readonly low: number; readonly high: number } {
  if (n <= 0) return { low: 0, high: 1 };
  const z2 = chisquareQuantile(level, 1);
  const p = x / n;
  const denominator = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denominator;
  const half = (Math.sqrt(z2) / denominator) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  // At x = 0 (x = n) the bound is exactly 0 (1) in theory; say so rather than leave round-off.
  return { low: x === 0 ? 0 : Math.max(0, centre - half), high: x === n ? 1 : Math.min(1, centre + half) };
}
