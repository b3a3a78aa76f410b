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

/**
 * One step of the general projector as JavaScript did it before planStep (project-chunk.ts at
 * 344ab62): per sub-population y = x_g·M_g, then each striking event z = Σᵢ yᵢ·Eᵢ (yᵢ ≠ 0), and the
 * total assigned for the first sub-population and added for the rest.
 */
function jsPlanStep(G: number, k: number, xs: Float64Array, M: readonly Float64Array[], E: readonly Float64Array[],
  strikes: (e: number, g: number) => boolean, total: Float64Array): void {
  const y = new Float64Array(k);
  const z = new Float64Array(k);
  for (let g = 0; g < G; g++) {
    const x0 = xs[g * k]!;
    for (let j = 0; j < k; j++) y[j] = x0 * M[g]![j]!;
    for (let i = 1; i < k; i++) {
      const xi = xs[g * k + i]!;
      if (xi === 0) continue;
      for (let j = 0; j < k; j++) y[j] += xi * M[g]![i * k + j]!;
    }
    for (let e = 0; e < E.length; e++) {
      if (!strikes(e, g)) continue;
      z.fill(0);
      for (let i = 0; i < k; i++) { const yi = y[i]!; if (yi !== 0) for (let j = 0; j < k; j++) z[j] += yi * E[e]![i * k + j]!; }
      y.set(z);
    }
    for (let s = 0; s < k; s++) { xs[g * k + s] = y[s]!; total[s] = g === 0 ? y[s]! : total[s]! + y[s]!; }
  }
}

describe('the general projector\'s step in the kernel (planStep)', () => {
  it('gives the bits of the JavaScript loop: 1–3 sub-populations, 0–2 landscape events striking some of them, k odd and even, 40 steps', () => {
    for (const k of [1, 2, 5, 6, 9]) {
      for (const G of [1, 2, 3]) {
        for (const events of [0, 1, 2]) {
          // Area: G matrices, the events' matrices, mixes, y, z, total (k each), then G u32 addresses and events × G flags.
          const work = (G + events) * k * k + (G + 3) * k + G + events * G;
          const kernel = yearKernel(k, 0, 0, { matrices: work });
          const area = kernel.matrices;
          const M = Array.from({ length: G }, (_, g) => stochastic(k, 31 * k + 7 * g + events));
          const E = Array.from({ length: events }, (_, e) => stochastic(k, 1000 + 13 * k + e));
          M.forEach((m, g) => area.set(m, g * k * k));
          E.forEach((m, e) => area.set(m, (G + e) * k * k));
          const mixesAt = (G + events) * k * k;
          const mixes = area.subarray(mixesAt, mixesAt + G * k);
          const total = area.subarray(mixesAt + (G + 2) * k, mixesAt + (G + 3) * k);
          const mats = new Uint32Array(area.buffer, area.byteOffset + (mixesAt + (G + 3) * k) * 8, G);
          const flags = new Uint8Array(area.buffer, mats.byteOffset + G * 4, events * G);
          M.forEach((_, g) => { mats[g] = area.byteOffset + g * k * k * 8; });
          const xs = new Float64Array(G * k);
          for (let g = 0; g < G; g++) xs[g * k + ((g + k) % k)] = 1 / G; // one state each: zeros in the mix
          mixes.set(xs);
          const want = new Float64Array(k);
          for (let t = 0; t < 40; t++) {
            const strikes = (e: number, g: number): boolean => (t * 7 + e * 3 + g) % 4 === 0;
            for (let e = 0; e < events; e++) for (let g = 0; g < G; g++) flags[e * G + g] = strikes(e, g) ? 1 : 0;
            jsPlanStep(G, k, xs, M, E, strikes, want);
            kernel.planStep(G, k, mixes.byteOffset, mixes.byteOffset + G * k * 8, mixes.byteOffset + (G + 1) * k * 8, mats.byteOffset,
              events, area.byteOffset + G * k * k * 8, flags.byteOffset, total.byteOffset);
            expect(Array.from(total)).toEqual(Array.from(want));
            expect(Array.from(mixes)).toEqual(Array.from(xs));
          }
        }
      }
    }
  });
});
