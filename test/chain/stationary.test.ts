import fc from 'fast-check';
import { lusolve, matrix, transpose, subtract, identity, type Matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { stationaryMix } from '../../src/chain/stationary.js';
import { communicatingClasses } from '../../src/chain/classes.js';
import { stochasticMatrix } from '../helpers.js';

/** π from mathjs: solve (Pᵀ − I)π = 0 with the last equation replaced by Σπ = 1. */
function mathjsStationary(P: number[][]): number[] {
  const k = P.length;
  const A = (subtract(transpose(matrix(P)), identity(k)) as Matrix).toArray() as number[][];
  A[k - 1] = new Array<number>(k).fill(1);
  const b = new Array<number>(k).fill(0);
  b[k - 1] = 1;
  return (lusolve(A, b) as number[][]).map((r) => r[0]!);
}

describe('stationaryMix', () => {
  it('agrees with a mathjs linear solve on random positive stochastic matrices (property)', () => {
    fc.assert(fc.property(fc.integer({ min: 2, max: 8 }).chain((k) => stochasticMatrix(k)), (P) => {
      const k = P.length;
      // Strictly positive rows so the chain is irreducible and the linear system well posed.
      const Q = P.map((row) => row.map((x) => (x + 0.01) / (1 + 0.01 * k)));
      const result = stationaryMix(Float64Array.from(Q.flat()), k);
      expect(result.unique).toBe(true);
      if (!result.unique) return;
      mathjsStationary(Q).forEach((x, s) => expect(Math.abs(result.mix[s]! - x)).toBeLessThan(1e-10));
    }), { numRuns: 200 });
  });

  it('is accurate to 1e-12 on a nearly decomposable chain (coupling 1e-13)', () => {
    // Birth–death chain on 6 states with two blocks {0,1,2} and {3,4,5} joined by ε = 1e-13.
    // Detailed balance gives π exactly: π(i+1)/π(i) = p(i,i+1)/p(i+1,i) (Kemeny & Snell 1960, sec. 5.3).
    const eps = 1e-13;
    const up = [0.3, 0.2, eps, 0.4, 0.1];
    const down = [0.25, 0.35, 2 * eps, 0.15, 0.45];
    const k = 6;
    const P = new Float64Array(k * k);
    for (let i = 0; i < k - 1; i++) { P[i * k + i + 1] = up[i]!; P[(i + 1) * k + i] = down[i]!; }
    for (let i = 0; i < k; i++) { let s = 0; for (let j = 0; j < k; j++) s += P[i * k + j]!; P[i * k + i] = 1 - s; }
    const exact = [1];
    for (let i = 0; i < k - 1; i++) exact.push(exact[i]! * up[i]! / down[i]!);
    const total = exact.reduce((a, b) => a + b, 0);
    const result = stationaryMix(P, k);
    expect(result.unique).toBe(true);
    if (!result.unique) return;
    exact.forEach((x, s) => expect(Math.abs(result.mix[s]! - x / total)).toBeLessThan(1e-12));
  });

  it('is right, not NaN, when a state is nearly absorbing beyond the double range (outflow 1e-312: a posterior draw found one)', () => {
    // Birth–death chain 0 ↔ 1 ↔ 2 whose last state leaves with chance 1e-312 (a subnormal number):
    // detailed balance gives π exactly (Kemeny & Snell 1960, sec. 5.3), π ∝ [1, 1.2, 1.2e311] (0.3/0.25 = 1.2; 1.2 · 0.1/1e-312).
    // Dividing by that outflow overflowed and made ∞ · 0 = NaN; both orders of the states are checked.
    const up = [0.3, 0.1];
    const down = [0.25, 1e-312];
    const chain = (order: number[]): Float64Array => {
      const k = 3;
      const P = new Float64Array(k * k);
      const at = (i: number, j: number): number => order[i]! * k + order[j]!;
      for (let i = 0; i < 2; i++) { P[at(i, i + 1)] = up[i]!; P[at(i + 1, i)] = down[i]!; }
      for (let i = 0; i < k; i++) { let t = 0; for (let j = 0; j < k; j++) if (j !== i) t += P[at(i, j)]!; P[at(i, i)] = 1 - t; }
      return P;
    };
    // Divided through by 1.2e311 (itself past the double range), with c = 1e-312: π ∝ [c/0.12, c/0.1, 1],
    // whose sum is 1 in doubles.
    const c = 1e-312;
    const exact = [c / 0.12, c / 0.1, 1];
    for (const order of [[0, 1, 2], [2, 1, 0]]) {
      const result = stationaryMix(chain(order), 3);
      expect(result.unique).toBe(true);
      if (!result.unique) return;
      exact.forEach((x, s) => {
        const got = result.mix[order[s]!]!;
        expect(Number.isFinite(got)).toBe(true);
        expect(Math.abs(got - x) / x).toBeLessThan(1e-9);
      });
    }
  });

  it('puts zero weight on transient states when there is one closed class', () => {
    // 0 → 1 only; {1, 2} closed and irreducible with π = (0, 1/3, 2/3).
    const P = Float64Array.from([0.5, 0.5, 0, 0, 0.2, 0.8, 0, 0.4, 0.6]);
    const result = stationaryMix(P, 3);
    expect(result.unique).toBe(true);
    if (result.unique) {
      expect(result.mix[0]).toBe(0);
      expect(result.mix[1]).toBeCloseTo(1 / 3, 14);
      expect(result.mix[2]).toBeCloseTo(2 / 3, 14);
    }
  });

  it('finds communicating classes and which are closed', () => {
    const P = Float64Array.from([0.5, 0.5, 0, 0, 0.2, 0.8, 0, 0.4, 0.6]);
    expect(communicatingClasses(P, 3)).toEqual({ classes: [[0], [1, 2]], closed: [false, true] });
  });
});
