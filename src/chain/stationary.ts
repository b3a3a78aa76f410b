import { communicatingClasses, type ChainClasses } from './classes.js';

export type StationaryResult =
  | { readonly unique: true; readonly mix: Float64Array }
  | { readonly unique: false; readonly closedClasses: readonly (readonly number[])[] };

/**
 * The stationary mix π = πP of a row-stochastic matrix, when it is unique.
 *
 * It is unique exactly when the chain has one closed class; π is then zero on every transient
 * state and, on the closed class, is found by GTH on the restriction of P to that class.
 * With two or more closed classes the long-run mix depends on where the sites start, and we say
 * so rather than return one of infinitely many answers.
 */
export function stationaryMix(p: ArrayLike<number>, k: number, offset = 0): StationaryResult {
  return stationaryGivenClasses(p, k, offset, communicatingClasses(p, k, offset));
}

/** The closed classes, in order: the long-run mix is unique exactly when there is one (stationaryMix). */
export function closedClassesOf({ classes, closed }: ChainClasses): (readonly number[])[] {
  return classes.filter((_, c) => closed[c]);
}

/** As stationaryMix, with the classes already known (they depend only on which entries are positive). */
export function stationaryGivenClasses(p: ArrayLike<number>, k: number, offset: number, classes: ChainClasses): StationaryResult {
  const closedClasses = closedClassesOf(classes);
  if (closedClasses.length !== 1) return { unique: false, closedClasses };
  const members = closedClasses[0]!;
  const m = members.length;
  const sub = new Float64Array(m * m);
  members.forEach((i, a) => members.forEach((j, b) => { sub[a * m + b] = p[offset + i * k + j]!; }));
  const piSub = gth(sub, m);
  const mix = new Float64Array(k);
  members.forEach((i, a) => { mix[i] = piSub[a]!; });
  return { unique: true, mix };
}

/**
 * Grassmann, Taksar & Heyman (1985), "Regenerative analysis and steady state distributions for
 * Markov chains", Operations Research 33:1107–1116.
 *
 * State reduction by censoring: states are eliminated from the last to the first, and the
 * diagonal is never used — the pivot `s` is the sum of the off-diagonal outflow of the state
 * being eliminated. Every operation adds or multiplies non-negative numbers, so there is no
 * subtractive cancellation: nearly decomposable chains (rows like 1 − 1e-12) keep full relative
 * accuracy where solving (Pᵀ − I)π = 0 loses it.
 *
 * Requires an irreducible matrix (then every pivot is positive). `a` is overwritten.
 */
export function gth(a: Float64Array, n: number): Float64Array {
  // `rowScale[m]`: the pivot of a state whose column could not be divided by it (below), else 1.
  const rowScale = new Float64Array(n).fill(1);
  for (let m = n - 1; m > 0; m--) {
    let s = 0;
    for (let j = 0; j < m; j++) s += a[m * n + j]!;
    if (!(s > 0)) throw new Error(`internal: GTH pivot ${s} at state ${m}; the matrix is not irreducible`);
    let largest = 0;
    for (let i = 0; i < m; i++) largest = Math.max(largest, a[i * n + m]!);
    if (Number.isFinite(largest / s)) {
      for (let i = 0; i < m; i++) a[i * n + m] /= s;
    } else {
      // A nearly absorbing state: its outflow s is so small (a posterior draw's row can be
      // 1 − 1e-312) that the column divided by it would overflow, and ∞ · 0 make NaN. The same
      // reduction with its row divided instead (each entry ≤ 1), the pivot kept for the back
      // substitution. Only here, so every other chain keeps the operations, and bits, it had.
      for (let j = 0; j < m; j++) a[m * n + j] /= s;
      rowScale[m] = s;
    }
    for (let i = 0; i < m; i++) {
      const aim = a[i * n + m]!;
      if (aim === 0) continue;
      for (let j = 0; j < m; j++) a[i * n + j] += aim * a[m * n + j]!;
    }
  }
  const pi = new Float64Array(n);
  pi[0] = 1;
  for (let j = 1; j < n; j++) {
    let x = 0;
    for (let i = 0; i < j; i++) x += pi[i]! * a[i * n + j]!;
    const share = x / rowScale[j]!;
    if (Number.isFinite(share)) pi[j] = share;
    else {
      // State j outweighs all before it beyond the double range: they are rescaled to it (and may
      // underflow to 0, which is what their share is).
      const f = rowScale[j]! / x;
      for (let i = 0; i < j; i++) pi[i]! *= f;
      pi[j] = 1;
    }
  }
  let total = 0;
  for (let j = 0; j < n; j++) total += pi[j]!;
  for (let j = 0; j < n; j++) pi[j] /= total;
  return pi;
}
