import type { GapCell } from '../chain/counts.js';
import type { Multinomial } from './multinomial.js';

/** Scratch space for sampleBridges, made once per chain (the sampler's inner loop allocates nothing). */
export interface BridgeScratch {
  readonly here: Int32Array;
  readonly next: Int32Array;
  readonly drawn: Int32Array;
  readonly q: Float64Array;
}

export function bridgeScratch(k: number): BridgeScratch {
  return { here: new Int32Array(k), next: new Int32Array(k), drawn: new Int32Array(k), q: new Float64Array(k) };
}

/**
 * Draw the latent paths of the n pairs of one gap cell (i seen, then j seen g steps later) given
 * P, and add their one-step transitions into `completed`.
 *
 * A path is drawn from its exact conditional law given both surveys: step by step,
 * P(X_{t+1} = b | X_t = a, X_g = j) = Pₐᵦ·(P^{g−t−1})ᵦⱼ / (P^{g−t})ₐⱼ. The backward quantities
 * (P^{r})·ⱼ are the backward filter of the bridge, so this is forward filtering–backward sampling
 * (Carter & Kohn 1994; Frühwirth-Schnatter 1994) run in the other direction, which a chain allows
 * (the joint law of the path factorises either way). Paths of different pairs are independent given
 * P (no observer error), so the n paths of a cell are drawn together: at each step the bridges in
 * state a move on as one Multinomial(mₐ, q) — O(g·k²) binomials per cell however large n is.
 *
 * `powers[r]` = Pʳ for r = 0 … g. With observer error the endpoints become emission vectors and
 * paths must be drawn per site; this per-cell form is the special case of exact surveys.
 */
export function sampleBridges(p: Float64Array, k: number, powers: readonly Float64Array[], cell: GapCell,
  multinomial: Multinomial, completed: Float64Array, scratch: BridgeScratch): void {
  const [i, j, g, n] = cell;
  const { here, next, drawn, q } = scratch;
  here.fill(0);
  here[i] = n;
  for (let t = 0; t < g; t++) {
    const after = powers[g - t - 1]!;
    next.fill(0);
    for (let a = 0; a < k; a++) {
      const m = here[a]!;
      if (m === 0) continue;
      // Normalised by the sum rather than by (P^{g−t})ₐⱼ: the same in exact arithmetic, a row that sums to 1 in floating point.
      let total = 0;
      let last = 0;
      for (let b = 0; b < k; b++) {
        total += q[b] = p[a * k + b]! * after[b * k + j]!;
        if (q[b]! > 0) last = b;
      }
      for (let b = 0; b < k; b++) q[b] = q[b]! / total;
      drawn.fill(0);
      // The sampler gives whatever rounding leaves over to its last state: end at the last state from
      // which j can still be reached, never at one from which it cannot.
      multinomial(m, q, 0, last + 1, drawn, 0);
      for (let b = 0; b < k; b++) {
        const x = drawn[b]!;
        if (x === 0) continue;
        completed[a * k + b] += x;
        next[b] += x;
      }
    }
    here.set(next);
  }
}
