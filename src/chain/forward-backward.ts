/**
 * Scaled forward–backward for one site's sequence (Baum et al. 1970; the scaled recursions of
 * Rabiner 1989, §V.A, eqs. 91–93): a chain with start distribution π and matrix P (row = from),
 * seen through per-step emission likelihoods e_t(s) = P(what was recorded at step t | true state s),
 * T × k in one flat array. An exact survey is an indicator vector, an unsurveyed step all ones, and
 * an observer who mislabels is a row of the error matrix — so one routine serves bridges between
 * exact surveys (bridges.ts is its pooled special case) and a hidden-state fit with observer error.
 *
 * Scaling: α̂_t = α_t / c_t with c_t = Σ α_t, so nothing underflows however long the sequence;
 * log-likelihood = Σ log c_t. Returns the smoothed marginals γ_t(s) = P(X_t = s | all records) and
 * the expected one-step transition counts Σ_t ξ_t(a, b) (Rabiner 1989, eq. 37).
 */
export interface Smoothed {
  readonly logLikelihood: number;
  /** T × k: P(X_t = s | records). */
  readonly gamma: Float64Array;
  /** k × k: expected transitions a → b over the sequence. */
  readonly transitions: Float64Array;
}

export function forwardBackward(pi: ArrayLike<number>, p: ArrayLike<number>, k: number, emissions: Float64Array): Smoothed {
  const T = emissions.length / k;
  const alpha = new Float64Array(T * k);
  const beta = new Float64Array(T * k);
  const scale = new Float64Array(T);
  let logLikelihood = 0;
  for (let t = 0; t < T; t++) {
    let c = 0;
    for (let s = 0; s < k; s++) {
      let x: number;
      if (t === 0) x = pi[s]!;
      else {
        x = 0;
        for (let r = 0; r < k; r++) x += alpha[(t - 1) * k + r]! * p[r * k + s]!;
      }
      alpha[t * k + s] = x * emissions[t * k + s]!;
      c += alpha[t * k + s]!;
    }
    if (!(c > 0)) return { logLikelihood: -Infinity, gamma: new Float64Array(T * k), transitions: new Float64Array(k * k) };
    for (let s = 0; s < k; s++) alpha[t * k + s] /= c;
    scale[t] = c;
    logLikelihood += Math.log(c);
  }
  for (let s = 0; s < k; s++) beta[(T - 1) * k + s] = 1;
  for (let t = T - 2; t >= 0; t--) {
    for (let r = 0; r < k; r++) {
      let x = 0;
      for (let s = 0; s < k; s++) x += p[r * k + s]! * emissions[(t + 1) * k + s]! * beta[(t + 1) * k + s]!;
      // Divided by the next step's scale, so that α̂_t β̂_t is the smoothed marginal directly.
      beta[t * k + r] = x / scale[t + 1]!;
    }
  }
  const gamma = new Float64Array(T * k);
  for (let c = 0; c < T * k; c++) gamma[c] = alpha[c]! * beta[c]!;
  const transitions = new Float64Array(k * k);
  for (let t = 0; t + 1 < T; t++) {
    for (let a = 0; a < k; a++) {
      const from = alpha[t * k + a]!;
      if (from === 0) continue;
      for (let b = 0; b < k; b++) {
        transitions[a * k + b] += from * p[a * k + b]! * emissions[(t + 1) * k + b]! * beta[(t + 1) * k + b]! / scale[t + 1]!;
      }
    }
  }
  return { logLikelihood, gamma, transitions };
}

/**
 * The most likely sequence of true states given the records (Viterbi 1967; Rabiner 1989, §III.B),
 * in logarithms so that long sequences do not underflow. Ties go to the lower state index.
 */
export function mostLikelyPath(pi: ArrayLike<number>, p: ArrayLike<number>, k: number, emissions: Float64Array): { path: Int32Array; logProbability: number } {
  const T = emissions.length / k;
  const delta = new Float64Array(T * k);
  const back = new Int32Array(T * k);
  for (let s = 0; s < k; s++) delta[s] = Math.log(pi[s]!) + Math.log(emissions[s]!);
  for (let t = 1; t < T; t++) {
    for (let s = 0; s < k; s++) {
      let best = -Infinity;
      let arg = 0;
      for (let r = 0; r < k; r++) {
        const x = delta[(t - 1) * k + r]! + Math.log(p[r * k + s]!);
        if (x > best) { best = x; arg = r; }
      }
      delta[t * k + s] = best + Math.log(emissions[t * k + s]!);
      back[t * k + s] = arg;
    }
  }
  let end = 0;
  for (let s = 1; s < k; s++) if (delta[(T - 1) * k + s]! > delta[(T - 1) * k + end]!) end = s;
  const path = new Int32Array(T);
  path[T - 1] = end;
  for (let t = T - 1; t > 0; t--) path[t - 1] = back[t * k + path[t]!]!;
  return { path, logProbability: delta[(T - 1) * k + end]! };
}
