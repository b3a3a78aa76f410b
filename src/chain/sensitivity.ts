/**
 * Sensitivities of the stationary mix and of a horizon share to each transition probability,
 * with rows kept stochastic: raising pᵢⱼ by ε takes ε from the rest of row i in proportion
 * (d pᵢₗ = −ε·pᵢₗ / (1 − pᵢⱼ) for l ≠ j) — the same rescaling a treatment applies.
 *
 * Stationary mix: dπ = π (dP) Z with Z the fundamental matrix (Schweitzer 1968; Cho & Meyer 2000,
 * "Markov chain sensitivity measured by mean first passage times", Linear Algebra Appl. 316; in
 * ecology, Caswell 2001, ch. 9). As dP has only row i, dπ = πᵢ · (d Z).
 *
 * Horizon share: x_H = x₀ P^H, so d x_H = Σₜ x_t (dP) P^(H−1−t); its target component is
 * Σₜ x_t[i] · (d · P^(H−1−t) e_target), found with H forward and H backward vectors.
 */
export interface TransitionSensitivity {
  readonly from: number;
  readonly to: number;
  readonly probability: number;
  /** d π_s / d p_ij for every state s. */
  readonly stationary: Float64Array;
  /** d x_H[target] / d p_ij, when a target and horizon were given. */
  readonly horizon?: number;
}

/** The direction of "raise pᵢⱼ, take it from the rest of row i in proportion"; null when pᵢⱼ = 1. */
function direction(p: ArrayLike<number>, k: number, i: number, j: number): Float64Array | null {
  const pij = p[i * k + j]!;
  if (!(pij < 1)) return null;
  const d = new Float64Array(k);
  for (let l = 0; l < k; l++) d[l] = l === j ? 1 : -p[i * k + l]! / (1 - pij);
  return d;
}

export function transitionSensitivities(p: ArrayLike<number>, k: number, pi: ArrayLike<number>, z: Float64Array,
  impossible: Uint8Array, horizon?: { readonly start: ArrayLike<number>; readonly steps: number; readonly target: number }): TransitionSensitivity[] {
  const forward: Float64Array[] = [];
  const backward: Float64Array[] = [];
  if (horizon) {
    let x = Float64Array.from(horizon.start);
    let b = new Float64Array(k);
    b[horizon.target] = 1;
    for (let t = 0; t < horizon.steps; t++) {
      forward.push(x);
      backward.push(b);
      const nx = new Float64Array(k);
      const nb = new Float64Array(k);
      for (let a = 0; a < k; a++) {
        for (let c = 0; c < k; c++) {
          nx[c] += x[a]! * p[a * k + c]!;
          nb[a] += p[a * k + c]! * b[c]!;
        }
      }
      x = nx;
      b = nb;
    }
  }
  const out: TransitionSensitivity[] = [];
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      if (impossible[i * k + j]) continue;
      const d = direction(p, k, i, j);
      if (!d) continue;
      const stationary = new Float64Array(k);
      for (let s = 0; s < k; s++) {
        let v = 0;
        for (let l = 0; l < k; l++) v += d[l]! * z[l * k + s]!;
        stationary[s] = pi[i]! * v;
      }
      let h: number | undefined;
      if (horizon) {
        h = 0;
        for (let t = 0; t < horizon.steps; t++) {
          const b = backward[horizon.steps - 1 - t]!;
          let db = 0;
          for (let l = 0; l < k; l++) db += d[l]! * b[l]!;
          h += forward[t]![i]! * db;
        }
      }
      out.push({ from: i, to: j, probability: p[i * k + j]!, stationary, ...(h === undefined ? {} : { horizon: h }) });
    }
  }
  return out;
}
