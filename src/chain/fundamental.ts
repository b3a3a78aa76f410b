import { inv } from 'mathjs';
import type { ChainStructure } from './structure.js';

const square = (k: number, f: (i: number, j: number) => number): number[][] =>
  Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => f(i, j)));

/**
 * Kemeny & Snell's fundamental matrix of an ergodic chain, Z = (I − P + 1π)⁻¹ (Kemeny & Snell
 * 1960, §4.3), inverted with mathjs. Row-major k×k.
 */
export function fundamentalMatrix(p: ArrayLike<number>, k: number, pi: ArrayLike<number>, offset = 0): Float64Array {
  const z = inv(square(k, (i, j) => (i === j ? 1 : 0) - p[offset + i * k + j]! + pi[j]!)) as number[][];
  return Float64Array.from(z.flat());
}

/**
 * Mean first passage times of an ergodic chain from Z: m_ij = (z_jj − z_ij) / π_j for i ≠ j, and on
 * the diagonal the mean recurrence time m_jj = 1 / π_j (Kemeny & Snell 1960, Theorems 4.4.4–4.4.5).
 * These are times for one site to first reach a state — not the landscape-level time to a target.
 */
export function meanFirstPassage(z: Float64Array, k: number, pi: ArrayLike<number>): Float64Array {
  const m = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) m[i * k + j] = i === j ? 1 / pi[j]! : (z[j * k + j]! - z[i * k + j]!) / pi[j]!;
  }
  return m;
}

export interface Absorption {
  /** Transient states, in order; the rows of N, t and B. */
  readonly transient: readonly number[];
  /** Closed classes, in order; the columns of B. */
  readonly closedClasses: readonly (readonly number[])[];
  /** N = (I − Q)⁻¹: expected steps in each transient state before absorption (t × t). */
  readonly n: Float64Array;
  /** Expected steps until a closed class is reached, t = N·1. */
  readonly steps: Float64Array;
  /** B = N·R: probability of ending in each closed class (t × C). */
  readonly b: Float64Array;
}

/**
 * Absorbing-chain analysis (Kemeny & Snell 1960, ch. III; Grinstead & Snell, §11.2), generalised
 * from absorbing states to closed classes: Q is P on the transient states and R sums P's columns
 * over each closed class. Null when there are no transient states.
 */
export function absorption(p: ArrayLike<number>, k: number, structure: ChainStructure, offset = 0): Absorption | null {
  const transient = structure.transient;
  const t = transient.length;
  if (t === 0) return null;
  const closedClasses = structure.classes.filter((_, c) => structure.closed[c]);
  const N = inv(square(t, (a, b) => (a === b ? 1 : 0) - p[offset + transient[a]! * k + transient[b]!]!)) as number[][];
  const n = Float64Array.from(N.flat());
  const steps = Float64Array.from(N, (row) => row.reduce((x, y) => x + y, 0));
  const C = closedClasses.length;
  const b = new Float64Array(t * C);
  for (let a = 0; a < t; a++) {
    for (let c = 0; c < C; c++) {
      let sum = 0;
      for (let l = 0; l < t; l++) {
        let r = 0;
        for (const j of closedClasses[c]!) r += p[offset + transient[l]! * k + j]!;
        sum += N[a]![l]! * r;
      }
      b[a * C + c] = sum;
    }
  }
  return { transient, closedClasses, n, steps, b };
}
