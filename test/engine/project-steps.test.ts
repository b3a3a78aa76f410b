import { describe, expect, it } from 'vitest';
import { matrix, multiply } from 'mathjs';
import { randomStreams } from '../../src/uncertainty/random.js';
import { projectSteps, yearKernel } from '../../src/uncertainty/year-kernel.js';

/** The projection's step as JavaScript does it (project-chunk.ts plainProjector): y = x₀·M₀, then y += xᵢ·Mᵢ for xᵢ ≠ 0. */
function jsSteps(P: Float64Array, at: number, k: number, x: Float64Array, n: number, into: Float64Array): void {
  const y = new Float64Array(k);
  for (let s = 0; s < n; s++) {
    const x0 = x[0]!;
    for (let j = 0; j < k; j++) y[j] = x0 * P[at + j]!;
    for (let i = 1; i < k; i++) {
      const xi = x[i]!;
      if (xi === 0) continue;
      for (let j = 0; j < k; j++) y[j] += xi * P[at + i * k + j]!;
    }
    x.set(y);
    into.set(y, s * k);
  }
}

/** A random row-stochastic k × k matrix with structural zeros (whole columns sometimes, so mixes get exact zeros). */
function stochastic(k: number, seed: number): Float64Array {
  const r = randomStreams(seed).stream('project-steps');
  const P = new Float64Array(k * k);
  const absent = Math.floor(r.uniform() * k);
  for (let i = 0; i < k; i++) {
    let sum = 0;
    for (let j = 0; j < k; j++) { const w = j === absent || r.uniform() < 0.2 ? 0 : r.uniform(); P[i * k + j] = w; sum += w; }
    if (sum === 0) { P[i * k + i] = 1; sum = 1; }
    for (let j = 0; j < k; j++) P[i * k + j]! /= sum;
  }
  return P;
}

describe('the projection kernel (WebAssembly SIMD, projectSteps)', () => {
  it('gives the bits of the JavaScript loop for every k from 1 to 13 and 100, odd and even, zeros in the mix included', () => {
    for (const k of [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 100]) {
      for (let seed = 1; seed <= 3; seed++) {
        const P = new Float64Array(3 + k * k);
        P.set(stochastic(k, seed * 100 + k), 3); // at an offset, as a draw inside the draws' array
        const x = new Float64Array(k);
        x[seed % k] = 1; // one state only: every other xᵢ is 0 at first
        const a = Float64Array.from(x);
        const b = Float64Array.from(x);
        const n = 70; // more steps than one run of the kernel's scratch at k = 100 (cut into runs)
        const js = new Float64Array(n * k);
        const wasm = new Float64Array(n * k);
        jsSteps(P, 3, k, a, n, js);
        projectSteps(P, 3, k, b, 0, n, wasm);
        expect(Array.from(wasm)).toEqual(Array.from(js));
        expect(Array.from(b)).toEqual(Array.from(a));
      }
    }
  });

  it('agrees with mathjs matrix products x·Mⁿ (an independent reference) to 1e-14', () => {
    const k = 7;
    const P = stochastic(k, 5);
    const x = Float64Array.from({ length: k }, (_, i) => (i + 1) / 28);
    const into = new Float64Array(20 * k);
    projectSteps(P, 0, k, Float64Array.from(x), 0, 20, into);
    const M = matrix(Array.from({ length: k }, (_, i) => Array.from(P.subarray(i * k, (i + 1) * k))));
    let ref = matrix([Array.from(x)]);
    for (let s = 0; s < 20; s++) {
      ref = multiply(ref, M);
      const row = (ref.toArray() as number[][])[0]!;
      row.forEach((v, j) => expect(into[s * k + j]!).toBeCloseTo(v, 14));
    }
  });

  it('leaves a year kernel made before it working (its scratch is its own, reserved with the instance)', () => {
    const k = 4;
    const kernel = yearKernel(k, 1, 1);
    const P = stochastic(k, 9);
    projectSteps(P, 0, k, Float64Array.of(1, 0, 0, 0), 0, 5, new Float64Array(5 * k));
    expect(kernel.years.length).toBe(k * k);
    expect(() => kernel.setDraw(0, P, 0, new Float64Array(k).fill(Infinity), 0)).not.toThrow();
  });
});
