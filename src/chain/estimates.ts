import betaQuantile from '@stdlib/stats-base-dists-beta-quantile';

export interface PointEstimate {
  /** Row-major k×k maximum-likelihood estimate; rows with no data hold the prior mean. */
  readonly p: Float64Array;
  /** From-states with no observed transitions: their row comes from the prior alone. */
  readonly rowsFromPrior: readonly number[];
  /** From-states seen only staying put: the MLE makes them absorbing, the posterior does not. */
  readonly rowsNeverLeft: readonly number[];
}

/**
 * Maximum-likelihood estimate p̂ᵢⱼ = nᵢⱼ / nᵢ (Anderson & Goodman 1957). It is undefined for a
 * from-state that was never observed; there we fall back to the prior mean αᵢⱼ / Σⱼ αᵢⱼ and flag the
 * row, so that downstream code always gets a stochastic matrix and the user always hears about it.
 */
export function maximumLikelihood(counts: Float64Array, alpha: Float64Array, k: number): PointEstimate {
  const p = new Float64Array(k * k);
  const rowsFromPrior: number[] = [];
  const rowsNeverLeft: number[] = [];
  for (let i = 0; i < k; i++) {
    const n = rowSum(counts, k, i);
    const source = n > 0 ? counts : alpha;
    const total = n > 0 ? n : rowSum(alpha, k, i);
    for (let j = 0; j < k; j++) p[i * k + j] = source[i * k + j]! / total;
    if (n === 0) rowsFromPrior.push(i);
    else if (counts[i * k + i] === n) rowsNeverLeft.push(i);
  }
  return { p, rowsFromPrior, rowsNeverLeft };
}

/** Posterior mean of each cell, (nᵢⱼ + αᵢⱼ) / Σⱼ (nᵢⱼ + αᵢⱼ); structural zeros stay 0. */
export function posteriorMean(counts: Float64Array, alpha: Float64Array, k: number): Float64Array {
  const mean = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    let a0 = 0;
    for (let j = 0; j < k; j++) a0 += alpha[i * k + j] === 0 ? 0 : counts[i * k + j]! + alpha[i * k + j]!;
    for (let j = 0; j < k; j++) mean[i * k + j] = alpha[i * k + j] === 0 ? 0 : (counts[i * k + j]! + alpha[i * k + j]!) / a0;
  }
  return mean;
}

export interface PosteriorSummary {
  readonly mean: Float64Array;
  readonly low: Float64Array;
  readonly high: Float64Array;
  readonly level: number;
}

/**
 * Exact marginal summaries of the row-wise Dirichlet posterior, no sampling: with
 * αᵢ = nᵢ + priorᵢ, each cell is Beta(αᵢⱼ, αᵢ₀ − αᵢⱼ) where αᵢ₀ = Σⱼ αᵢⱼ (Gelman et al. 2013,
 * Bayesian Data Analysis, 3rd ed., sec. 3.4). Equal-tailed intervals at `level` come from the Beta
 * quantile function. A structural zero (α = 0) is exactly 0; a row with a single possible
 * destination is exactly 1 there.
 */
export function posteriorSummary(counts: Float64Array, alpha: Float64Array, k: number, level: number): PosteriorSummary {
  const mean = posteriorMean(counts, alpha, k);
  const low = new Float64Array(k * k);
  const high = new Float64Array(k * k);
  const tail = (1 - level) / 2;
  for (let i = 0; i < k; i++) {
    let a0 = 0;
    for (let j = 0; j < k; j++) a0 += counts[i * k + j]! + alpha[i * k + j]!;
    for (let j = 0; j < k; j++) {
      const c = i * k + j;
      const a = alpha[c] === 0 ? 0 : counts[c]! + alpha[c]!;
      const b = a0 - a;
      if (a === 0 || b === 0) {
        low[c] = high[c] = mean[c]!;
      } else {
        low[c] = betaQuantile(tail, a, b);
        high[c] = betaQuantile(1 - tail, a, b);
      }
    }
  }
  return { mean, low, high, level };
}

export function rowSum(m: ArrayLike<number>, k: number, i: number): number {
  let s = 0;
  for (let j = 0; j < k; j++) s += m[i * k + j]!;
  return s;
}
