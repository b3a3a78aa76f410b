/**
 * Two-sided exact binomial test of x successes in n trials against probability p: the sum of the
 * probabilities of every outcome no more likely than x (the "minimum likelihood" rule of
 * R's binom.test and scipy.stats.binomtest; Clopper & Pearson 1934 give the matching interval).
 * A relative tolerance of 1e-7 keeps outcomes exactly as likely as x from being lost to rounding
 * (R uses the same). Never below the chosen size when the null holds: the test is exact, and
 * conservative because the outcomes are discrete.
 */
export function binomialTwoSidedP(x: number, n: number, p: number): number {
  if (n === 0) return 1;
  if (p <= 0) return x === 0 ? 1 : 0;
  if (p >= 1) return x === n ? 1 : 0;
  // log pmf for every outcome by the ratio pmf(j + 1) / pmf(j) = (n − j)/(j + 1) · p/(1 − p).
  const logPmf = new Float64Array(n + 1);
  logPmf[0] = n * Math.log1p(-p);
  const odds = Math.log(p) - Math.log1p(-p);
  for (let j = 0; j < n; j++) logPmf[j + 1] = logPmf[j]! + Math.log((n - j) / (j + 1)) + odds;
  const cut = logPmf[x]! + Math.log1p(1e-7);
  let total = 0;
  for (let j = 0; j <= n; j++) if (logPmf[j]! <= cut) total += Math.exp(logPmf[j]!);
  return Math.min(1, total);
}

/** Size of the coverage check: a count of bands this unlikely under the level is flagged. */
export const COVERAGE_ALPHA = 0.05;

export interface CoverageCheck {
  readonly covered: number;
  readonly bands: number;
  readonly level: number;
  readonly p: number;
  /** 'fewer' or 'more' than bands at this level should cover (p < COVERAGE_ALPHA), else null. */
  readonly flag: 'fewer' | 'more' | null;
}

/**
 * Is a count of covering bands far from the level? Treats the bands as independent trials, which
 * states of one survey are not (their counts add up to the sites), so the p-value is a guide.
 */
export function checkCoverage(covered: number, bands: number, level: number): CoverageCheck {
  const p = binomialTwoSidedP(covered, bands, level);
  const flag = p < COVERAGE_ALPHA ? (covered < level * bands ? 'fewer' : 'more') : null;
  return { covered, bands, level, p, flag };
}
