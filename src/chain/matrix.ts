// Every matrix inside sere is row-stochastic and stored row-major in a flat array:
// p[i*k + j] = P(next = j | now = i); row = from state, column = to state.

/** Rows of a flat k×k matrix as nested arrays (for JSON and tables). */
export function toRows<T = number>(p: ArrayLike<T>, k: number, offset = 0): T[][] {
  return Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => p[offset + i * k + j]!));
}

/** out = a · b for flat row-major k×k matrices; `out` must not alias `a` or `b`. */
export function multiplyInto(a: ArrayLike<number>, b: ArrayLike<number>, k: number, out: Float64Array): Float64Array {
  out.fill(0);
  for (let i = 0; i < k; i++) {
    for (let l = 0; l < k; l++) {
      const x = a[i * k + l]!;
      if (x === 0) continue;
      for (let j = 0; j < k; j++) out[i * k + j] += x * b[l * k + j]!;
    }
  }
  return out;
}

/** P⁰ … Pᵐ of a flat k×k matrix, by repeated multiplication (P⁰ is the identity). */
export function matrixPowers(p: ArrayLike<number>, k: number, m: number): Float64Array[] {
  const identity = new Float64Array(k * k);
  for (let i = 0; i < k; i++) identity[i * k + i] = 1;
  const powers: Float64Array[] = [identity];
  for (let t = 1; t <= m; t++) powers.push(multiplyInto(powers[t - 1]!, p, k, new Float64Array(k * k)));
  return powers;
}
