import type { GapCell } from './counts.js';
import { matrixPowers } from './matrix.js';

/**
 * The E-step for pairs of surveys g steps apart: given P, the expected number of one-step
 * transitions a→b inside every bridge from i (seen at time 0) to j (seen at time g), added into
 * `out`; returns the log-likelihood of those pairs, Σ n·log (Pᵍ)ᵢⱼ (−∞ when a pair is impossible
 * under P).
 *
 * For one bridge, P(X_t = a, X_{t+1} = b | X_0 = i, X_g = j) = (Pᵗ)ᵢₐ·Pₐᵦ·(P^{g−1−t})ᵦⱼ / (Pᵍ)ᵢⱼ:
 * the forward probability of reaching a, one step a→b, the backward probability of reaching j,
 * over the pair's likelihood — the forward–backward smoothed two-slice marginal (Baum et al. 1970;
 * Rabiner 1989, eq. 37) of a hidden chain whose emissions are exact at the two surveys and absent
 * between them. Because every bridge with the same (i, j, g) has the same marginals, the pooled
 * counts by gap are enough: with Wᵢⱼ = nᵢⱼ / (Pᵍ)ᵢⱼ the expected counts are
 * Pₐᵦ · Σₜ [(Pᵗ)ᵀ W (P^{g−1−t})ᵀ]ₐᵦ, O(g·k³) per gap whatever the number of pairs.
 *
 * No scaling (Rabiner's cₜ) is needed here: the forward and backward quantities are entries of
 * powers of a stochastic matrix, which stay in [0, 1] and do not shrink with g as a product of
 * per-step emission probabilities would. With observer error the endpoints' indicator vectors
 * become emission vectors and the sums run per site (scaled recursions), but the two-slice
 * marginal has the same form.
 */
export function addBridgeExpectations(p: Float64Array, k: number, gapCounts: readonly GapCell[], out: Float64Array,
  powers: readonly Float64Array[] = matrixPowers(p, k, maxGap(gapCounts))): number {
  let logLikelihood = 0;
  const w = new Float64Array(k * k);
  const m = new Float64Array(k * k);
  const s = new Float64Array(k * k);
  const rows: number[] = [];
  for (let first = 0; first < gapCounts.length;) {
    const g = gapCounts[first]![2];
    let last = first;
    while (last < gapCounts.length && gapCounts[last]![2] === g) last += 1;
    const pg = powers[g]!;
    w.fill(0);
    rows.length = 0;
    for (let c = first; c < last; c++) {
      const [i, j, , n] = gapCounts[c]!;
      const q = pg[i * k + j]!;
      if (!(q > 0)) return -Infinity;
      if (!rows.includes(i)) rows.push(i);
      w[i * k + j] += n / q;
      logLikelihood += n * Math.log(q);
    }
    s.fill(0);
    for (let t = 0; t < g; t++) {
      const before = powers[t]!;
      const after = powers[g - 1 - t]!;
      // m = W · (P^{g−1−t})ᵀ on the rows of W that hold pairs; then s += (Pᵗ)ᵀ · m.
      for (const i of rows) {
        for (let b = 0; b < k; b++) {
          let x = 0;
          for (let j = 0; j < k; j++) x += w[i * k + j]! * after[b * k + j]!;
          m[i * k + b] = x;
        }
        for (let a = 0; a < k; a++) {
          const r = before[i * k + a]!;
          if (r === 0) continue;
          for (let b = 0; b < k; b++) s[a * k + b] += r * m[i * k + b]!;
        }
      }
    }
    for (let c = 0; c < k * k; c++) out[c] += p[c]! * s[c]!;
    first = last;
  }
  return logLikelihood;
}

/** The longest gap among cells (0 when there are none). */
export function maxGap(gapCounts: readonly GapCell[]): number {
  let g = 0;
  for (const cell of gapCounts) g = Math.max(g, cell[2]);
  return g;
}

/** Σ nᵢⱼ·log pᵢⱼ over one-step counts (a cell never seen contributes nothing; a seen cell of probability 0 gives −∞). */
export function oneStepLogLikelihood(p: Float64Array, counts: Float64Array): number {
  let ll = 0;
  for (let c = 0; c < counts.length; c++) if (counts[c]! > 0) ll += counts[c]! * Math.log(p[c]!);
  return ll;
}
