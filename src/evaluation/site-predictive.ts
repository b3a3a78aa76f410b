import type { MatrixDraws } from '../uncertainty/draws.js';
import type { RandomStream } from '../uncertainty/random.js';
import type { SiteCase } from './site-cases.js';
import { inverseCdfState } from '../uncertainty/categorical.js';

export interface SitePredictive {
  /**
   * Posterior predictive probabilities, cases × k: for each case the mean over draws of row
   * `from` of P_d^gap. Averaging the draws' powers, not powering the mean matrix: (E P)^g ≠ E(P^g)
   * for g > 1, and only the former ignores how uncertain the matrix is.
   */
  readonly probabilities: Float64Array;
  /**
   * Sites predicted in each state at the scored time, layout [state][draw]: per draw each site's
   * state sampled from its row of P_d^gap, so the spread holds both the matrix's uncertainty and
   * each site's own chance — a prediction band for the counts of exactly these sites.
   */
  readonly counts: Int32Array;
  readonly draws: number;
}

/**
 * Per-site forecasts from each site's own last recorded state. Given a matrix draw, sites move
 * independently and a site's state g steps on is distributed as row i of P^g, so drawing the end
 * state from that row is the same in distribution as simulating the path step by step.
 * Rows of P^g are found by propagating each needed unit vector: (distinct from-states) × k² per step.
 */
export function sitePredictive(matrices: MatrixDraws, cases: readonly SiteCase[], random: RandomStream): SitePredictive {
  const { k, count: D, data } = matrices;
  const k2 = k * k;
  const n = cases.length;
  const probabilities = new Float64Array(n * k);
  const counts = new Int32Array(k * D);
  if (n === 0) return { probabilities, counts, draws: D };
  const byGap = new Map<number, number[]>();
  cases.forEach((c, index) => byGap.set(c.gap, [...(byGap.get(c.gap) ?? []), index]));
  const gaps = [...byGap.keys()].sort((a, b) => a - b);
  const maxGap = gaps[gaps.length - 1]!;
  const fromStates = [...new Set(cases.map((c) => c.from))];
  // rows[f*k + j]: row `fromStates[f]` of the current power of this draw's matrix.
  const rows = new Float64Array(fromStates.length * k);
  const next = new Float64Array(k);
  const slot = new Int32Array(k).fill(-1);
  fromStates.forEach((s, f) => { slot[s] = f; });
  const uniform = random.uniform;
  for (let d = 0; d < D; d++) {
    const base = d * k2;
    rows.fill(0);
    fromStates.forEach((s, f) => { rows[f * k + s] = 1; });
    let g = 0;
    for (const gap of gaps) {
      for (; g < gap; g++) {
        for (let f = 0; f < fromStates.length; f++) {
          next.fill(0);
          for (let i = 0; i < k; i++) {
            const x = rows[f * k + i]!;
            if (x === 0) continue;
            for (let j = 0; j < k; j++) next[j] += x * data[base + i * k + j]!;
          }
          rows.set(next, f * k);
        }
      }
      for (const index of byGap.get(gap)!) {
        const at = slot[cases[index]!.from]! * k;
        for (let j = 0; j < k; j++) probabilities[index * k + j] += rows[at + j]!;
        counts[inverseCdfState(rows, at, k, uniform()) * D + d] += 1;
      }
    }
    if (g !== maxGap) throw new Error('internal: site powers out of step');
  }
  for (let x = 0; x < n * k; x++) probabilities[x] /= D;
  return { probabilities, counts, draws: D };
}
