/**
 * One draw of Multinomial(1, w[offset … offset+count)) as the state it falls in — exactly what
 * `multinomialSampler` (multinomial.ts) gives for n = 1, uniform for uniform: the same sequential
 * binomials (Devroye 1986, ch. XI.1), each Binomial(1, ·) one Bernoulli trial U < p as binomial.ts
 * draws one trial, so a sampler may switch between the two without its seeded draws moving.
 * Without the counts array, the closure calls and the fills of the general sampler: measured
 * in DEVELOPERS.md (the `observer` bench), the error sampler's paths of one site are drawn this way.
 * `w` need not be normalised only in that its entries sum to 1 up to rounding, as the
 * multinomial's; the last entry of the range takes whatever is left.
 */
export function drawCategorical(uniform: () => number, w: Float64Array, offset: number, count: number): number {
  let mass = 1;
  const last = count - 1;
  for (let j = 0; j < last; j++) {
    const pj = w[offset + j]!;
    if (pj >= mass) return j;
    if (pj > 0) {
      const chance = pj / mass;
      // binomial.ts: a chance of 1 or more places the trial without a uniform.
      if (chance >= 1 || uniform() < chance) return j;
    }
    mass -= pj;
  }
  return last;
}

/** Index of the last positive entry of `v[offset … offset+k)` (the multinomial gives rounding leftovers to its last state). */
export function lastPositive(v: Float64Array, offset: number, k: number): number {
  let last = 0;
  for (let x = 0; x < k; x++) if (v[offset + x]! > 0) last = x;
  return last;
}

/**
 * One state drawn by the inverse CDF of `row[at … at+k)` from one uniform `u`: the first state
 * whose running total passes u; rounding may leave u just above the row's total, and then the last
 * state with mass takes it. The per-site predictive bands draw each site's state this way.
 */
export function inverseCdfState(row: ArrayLike<number>, at: number, k: number, u: number): number {
  for (let j = 0; j < k; j++) {
    const p = row[at + j]!;
    if (p > 0) { u -= p; if (u < 0) return j; }
  }
  for (let j = k - 1; j >= 0; j--) if (row[at + j]! > 0) return j;
  return -1;
}
