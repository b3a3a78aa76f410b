// Every matrix inside sere is row-stochastic and stored row-major in a flat array:
// p[i*k + j] = P(next = j | now = i); row = from state, column = to state.

/** Rows of a flat k×k matrix as nested arrays (for JSON and tables). */
export function toRows(p: ArrayLike<number>, k: number, offset = 0): number[][] {
  return Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => p[offset + i * k + j]!));
}
