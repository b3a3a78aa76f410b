/**
 * The chain restricted to the states in `keep`: their rows and columns only, each row renormalised
 * to sum to 1 — the chain conditioned on never entering a dropped state. Row-major m×m, in the order
 * of `keep`. Undefined (null) when some kept state has no probability left for the kept states, that
 * is, when from it the chain can only go to dropped states.
 */
export function restrictChain(p: ArrayLike<number>, k: number, keep: readonly number[], offset = 0): Float64Array | null {
  const m = keep.length;
  const out = new Float64Array(m * m);
  for (let a = 0; a < m; a++) {
    const i = keep[a]!;
    let sum = 0;
    for (let b = 0; b < m; b++) sum += p[offset + i * k + keep[b]!]!;
    if (!(sum > 0)) return null;
    for (let b = 0; b < m; b++) out[a * m + b] = p[offset + i * k + keep[b]!]! / sum;
  }
  return out;
}
