import gammainc from '@stdlib/math-base-special-gammainc';
import { describe, expect, it } from 'vitest';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import { generatorOfKey, keyOf, randomStreams, streamKey } from '../../src/uncertainty/random.js';
import { yearKernel } from '../../src/uncertainty/year-kernel.js';

/**
 * The JavaScript year matrix the engine drew before the WebAssembly kernel (sere 0.4's
 * engine/year-matrix.ts): row i ~ Dirichlet(κᵢ·Pᵢ) from `generatorOfKey(key).gamma`, κ = ∞ copied.
 */
function referenceYearMatrix(P: Float64Array, k: number, kappa: Float64Array, gamma: (a: number) => number, out: Float64Array): void {
  const alpha = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    if (kappa[i] === Infinity) { for (let j = 0; j < k; j++) out[i * k + j] = P[i * k + j]!; continue; }
    for (let j = 0; j < k; j++) alpha[j] = kappa[i]! * P[i * k + j]!;
    sampleDirichlet({ gamma }, alpha, 0, k, out, i * k);
  }
}

/** A random row-stochastic k × k matrix with some structural zeros, and κ per row from 10⁻³ to 10⁵ (some ∞). */
function caseOf(seed: number, k: number): { P: Float64Array; kappa: Float64Array } {
  const r = randomStreams(seed).stream('case');
  const P = new Float64Array(k * k);
  const kappa = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    let sum = 0;
    for (let j = 0; j < k; j++) { const w = r.uniform() < 0.25 ? 0 : r.uniform() ** 4; P[i * k + j] = w; sum += w; }
    if (sum === 0) { P[i * k + i] = 1; sum = 1; }
    for (let j = 0; j < k; j++) P[i * k + j]! /= sum;
    kappa[i] = r.uniform() < 0.1 ? Infinity : 10 ** (8 * r.uniform() - 3);
  }
  return { P, kappa };
}

const bitsEqual = (a: Float64Array, b: Float64Array): boolean => a.every((x, i) => Object.is(x, b[i]));

describe('the WebAssembly year kernel', () => {
  it('draws exactly the JavaScript generator\'s year matrices: 400 seeds × k = 2, 3, 5, 10, four interleaved streams', () => {
    let matrices = 0;
    for (let seed = 1; seed <= 100; seed++) {
      for (const k of [2, 3, 5, 10]) {
        const { P, kappa } = caseOf(seed * 13 + k, k);
        const keys = new Uint32Array(4 * 8);
        for (let n = 0; n < 4; n++) keys.set(streamKey(seed, `years:${k}:${n}`), 8 * n);
        const kernel = yearKernel(k, 4, 2);
        kernel.setDraw(1, P, 0, kappa, 0);
        const js = [0, 1, 2, 3].map((n) => generatorOfKey(keys, 8 * n).gamma);
        for (let n = 0; n < 4; n++) kernel.startStream(n, keys, 8 * n);
        const b = new Float64Array(k * k);
        for (let rep = 0; rep < 12; rep++) {
          const n = (rep * 7 + seed) % 4; // streams taken in a shuffled order, as blocks and steps take them
          kernel.sample(n, 1);
          referenceYearMatrix(P, k, kappa, js[n]!, b);
          expect(bitsEqual(kernel.years.subarray(k * k), b), `seed ${seed}, k ${k}, draw ${rep}`).toBe(true);
          matrices += 1;
        }
      }
    }
    expect(matrices).toBe(4800);
  });

  it('agrees where every variate of a row underflows (redraws, then the mode\'s corner) and from the all-zero key', () => {
    // α = 10⁻⁴: Gamma(α) = Gamma(1 + α)·U^(1/α) is 0 in doubles unless U > 0.93, so whole rows underflow.
    const k = 4;
    const P = Float64Array.from({ length: k * k }, () => 1 / k);
    const kappa = Float64Array.of(4e-4, 4e-5, 4e-3, 1e-6);
    for (const key of [streamKey(5, 'tiny'), new Uint32Array(8)]) {
      const kernel = yearKernel(k, 1);
      kernel.startStream(0, key, 0);
      kernel.setDraw(0, P, 0, kappa, 0);
      const gamma = generatorOfKey(key).gamma;
      const a = kernel.years;
      const b = new Float64Array(k * k);
      let corners = 0;
      for (let rep = 0; rep < 200; rep++) {
        kernel.sample(0, 0);
        referenceYearMatrix(P, k, kappa, gamma, b);
        expect(bitsEqual(a, b)).toBe(true);
        corners += a.filter((x) => x === 1).length;
      }
      expect(corners).toBeGreaterThan(400); // most rows end on one corner: the path is exercised
    }
  });

  it('gamma variates pass a Kolmogorov–Smirnov test against the gamma CDF at shapes 0.05, 0.5, 1, 3, 50 (α = 0.001 each)', () => {
    // Critical value of D for n = 20,000 at α = 0.001: scipy.stats.kstwo.ppf(0.999, 20000) = 0.013776…
    // (as in gamma.test.ts). Five tests at α = 0.001: a correct sampler fails one with chance ≈ 0.005;
    // the seed is fixed, so the outcome is too.
    const critical = 0.01377632198266413;
    const n = 20_000;
    for (const shape of [0.05, 0.5, 1, 3, 50]) {
      const kernel = yearKernel(2, 1);
      kernel.startStream(0, keyOf(randomStreams(4242).stream(`wasm-gamma:${shape}`)), 0);
      const x = new Float64Array(n);
      kernel.gammas(0, shape, x);
      x.sort();
      let d = 0;
      for (let i = 0; i < n; i++) {
        const f = gammainc(x[i]!, shape);
        d = Math.max(d, (i + 1) / n - f, f - i / n);
      }
      expect(d, `shape ${shape}`).toBeLessThan(critical);
      // And they are the JavaScript generator's variates.
      const gamma = generatorOfKey(keyOf(randomStreams(4242).stream(`wasm-gamma:${shape}`))).gamma;
      const y = Float64Array.from({ length: n }, () => gamma(shape)).sort();
      expect(bitsEqual(x, y), `shape ${shape}`).toBe(true);
    }
  });

  it('refuses a stream outside its range and a kernel whose memory another took', () => {
    const first = yearKernel(3, 2);
    expect(() => first.startStream(2, new Uint32Array(8), 0)).toThrow(/outside/);
    yearKernel(3, 2);
    expect(() => first.sample(0, 0)).toThrow(/another/);
    expect(() => yearKernel(3, 2).sample(0, 1)).toThrow(/slot/);
  });
});
