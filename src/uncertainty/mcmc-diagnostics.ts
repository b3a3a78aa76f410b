import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';

/**
 * Convergence diagnostics of a sampler run as several chains, after Vehtari, Gelman, Simpson,
 * Carpenter & Bürkner (2021, "Rank-normalization, folding, and localization: an improved R̂",
 * Bayesian Analysis 16(2)): each chain is split in half (a trend within a chain then shows as
 * disagreement between halves), draws are replaced by the normal scores of their ranks (so heavy
 * tails and skew do not fool the variances), and
 *
 * - R̂ is the larger of the rank-normalised split-R̂ of the draws and of their distance from the
 *   median (the "folded" draws, which catch chains that differ in spread only);
 * - the effective sample size is the bulk ESS: rank-normalised split chains, autocorrelations
 *   combined across chains, summed with Geyer's (1992) initial monotone sequence.
 *
 * Thresholds (Vehtari et al. 2021, sec. 4): R̂ < 1.01 and ESS > 400 before the draws are trusted;
 * common practice since. A quantity that never varies returns NaN for both (nothing to diagnose).
 */
export interface Convergence {
  readonly rhat: number;
  readonly ess: number;
}

/** R̂ above this is a warning (Vehtari et al. 2021). */
export const RHAT_WARNING = 1.01;
/** A bulk effective sample size below this is a warning (Vehtari et al. 2021). */
export const ESS_WARNING = 400;

/** `chains[c][n]`: draw n of chain c, every chain the same length (at least 4). */
export function convergence(chains: readonly Float64Array[]): Convergence {
  const split = splitChains(chains);
  const all = split.flatMap((c) => Array.from(c));
  if (all.every((x) => x === all[0])) return { rhat: Number.NaN, ess: Number.NaN };
  const median = medianOf(all);
  const bulk = rankNormalise(split);
  const folded = rankNormalise(split.map((c) => c.map((x) => Math.abs(x - median))));
  return { rhat: Math.max(rhatOf(bulk), rhatOf(folded)), ess: essOf(bulk) };
}

function splitChains(chains: readonly Float64Array[]): Float64Array[] {
  const half = Math.floor(chains[0]!.length / 2);
  // With an odd length the middle draw is dropped, so both halves have the same length.
  return chains.flatMap((c) => [c.slice(0, half), c.slice(c.length - half)]);
}

/** Normal scores of the pooled ranks, Φ⁻¹((r − 3/8) / (S + 1/4)) with average ranks for ties (Blom 1958). */
function rankNormalise(chains: readonly Float64Array[]): Float64Array[] {
  const n = chains[0]!.length;
  const pooled = chains.flatMap((c, m) => Array.from(c, (x, i) => ({ x, at: m * n + i })));
  pooled.sort((a, b) => a.x - b.x);
  const z = chains.map(() => new Float64Array(n));
  const s = pooled.length;
  for (let a = 0; a < s;) {
    let b = a + 1;
    while (b < s && pooled[b]!.x === pooled[a]!.x) b += 1;
    const rank = (a + 1 + b) / 2;
    const score = normalQuantile((rank - 3 / 8) / (s + 1 / 4), 0, 1);
    for (let r = a; r < b; r++) z[Math.floor(pooled[r]!.at / n)]![pooled[r]!.at % n] = score;
    a = b;
  }
  return z;
}

function meanOf(x: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i]!;
  return s / x.length;
}

function medianOf(x: number[]): number {
  const sorted = [...x].sort((a, b) => a - b);
  const m = sorted.length >> 1;
  return sorted.length % 2 ? sorted[m]! : (sorted[m - 1]! + sorted[m]!) / 2;
}

/** Gelman et al. (2013, BDA3 eq. 11.4) on the given chains: √(var⁺ / W). */
function rhatOf(chains: readonly Float64Array[]): number {
  const n = chains[0]!.length;
  const means = chains.map(meanOf);
  const within = meanOf(chains.map((c, m) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += (c[i]! - means[m]!) ** 2;
    return s / (n - 1);
  }));
  const grand = meanOf(means);
  const between = n * means.reduce((s, x) => s + (x - grand) ** 2, 0) / (chains.length - 1);
  return Math.sqrt(((n - 1) / n * within + between / n) / within);
}

/**
 * Bulk ESS (Vehtari et al. 2021, eqs. 10–11; the same steps as Stan's `ess_bulk`): the combined
 * autocorrelation ρₜ = 1 − (W − mean autocovariance at lag t) / var⁺, summed in pairs until a pair
 * is negative, the pairs made non-increasing (Geyer 1992), τ = −1 + 2·Σρ; ESS = M·N / τ.
 */
function essOf(chains: readonly Float64Array[]): number {
  const m = chains.length;
  const n = chains[0]!.length;
  const means = chains.map(meanOf);
  const autocovariance = (t: number): number => {
    let total = 0;
    chains.forEach((c, k) => {
      let s = 0;
      for (let i = 0; i + t < n; i++) s += (c[i]! - means[k]!) * (c[i + t]! - means[k]!);
      total += s / n;
    });
    return total / m;
  };
  const within = autocovariance(0) * n / (n - 1);
  const grand = meanOf(means);
  const between = m > 1 ? means.reduce((s, x) => s + (x - grand) ** 2, 0) / (m - 1) : 0;
  const varPlus = within * (n - 1) / n + between;
  const rho = (t: number): number => 1 - (within - autocovariance(t)) / varPlus;
  const pairs: number[] = [];
  for (let t = 0; t + 1 < n; t += 2) {
    let pair = (t === 0 ? 1 : rho(t)) + rho(t + 1);
    if (!(pair > 0)) break;
    if (pairs.length > 0) pair = Math.min(pair, pairs[pairs.length - 1]!);
    pairs.push(pair);
  }
  const tau = Math.max(-1 + 2 * pairs.reduce((a, b) => a + b, 0), 1 / Math.log10(m * n));
  return m * n / tau;
}
