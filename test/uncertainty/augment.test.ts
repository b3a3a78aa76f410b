import { describe, expect, it } from 'vitest';
import { addBridgeExpectations } from '../../src/chain/bridges.js';
import type { GapCell } from '../../src/chain/counts.js';
import { matrixPowers } from '../../src/chain/matrix.js';
import { posteriorSummary } from '../../src/chain/estimates.js';
import { mixturePosteriorSummary } from '../../src/chain/mixture-summary.js';
import { augment } from '../../src/uncertainty/augment.js';
import { bridgeScratch, sampleBridges } from '../../src/uncertainty/bridge-sampler.js';
import { convergence } from '../../src/uncertainty/mcmc-diagnostics.js';
import { multinomialSampler } from '../../src/uncertainty/multinomial.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { fitWithCounts } from '../helpers.js';

const p = Float64Array.from([0.6, 0.3, 0.1, 0.2, 0.5, 0.3, 0, 0.25, 0.75]);

describe('latent bridge paths drawn given P (forward filtering, backward sampling)', () => {
  it('average the expected one-step counts of the E-step (200,000 bridges of 3 steps, a → c)', () => {
    const cell: GapCell = [0, 2, 3, 200_000];
    const out = new Float64Array(9);
    sampleBridges(p, 3, matrixPowers(p, 3, 3), cell, multinomialSampler(randomStreams(3)), out, bridgeScratch(3));
    const want = new Float64Array(9);
    addBridgeExpectations(p, 3, [cell], want);
    // Each bridge adds 0 … 3 to a cell, so its variance is at most 9/4: the total's standard deviation
    // is at most √n·3/2 ≈ 671. Allowed: 5 of those (false alarm below 1e-6 per cell).
    out.forEach((x, c) => expect(Math.abs(x - want[c]!)).toBeLessThan(5 * Math.sqrt(200_000) * 1.5));
    expect(out.reduce((a, b) => a + b, 0)).toBe(600_000);
    expect(out[6]).toBe(0); // c → a is a structural zero of this P
  });

  it('put the middle state of 2-step bridges where Pᵢₐ·Pₐⱼ / (P²)ᵢⱼ says (χ², 2 df, false alarm 0.001)', () => {
    const n = 50_000;
    const out = new Float64Array(9);
    sampleBridges(p, 3, matrixPowers(p, 3, 2), [1, 2, 2, n], multinomialSampler(randomStreams(8)), out, bridgeScratch(3));
    const p2 = matrixPowers(p, 3, 2)[2]![1 * 3 + 2]!;
    // First steps b → a for a ≠ c are out[b][a]; out[b][c] also holds second steps b → c, so the
    // bridges whose middle state is c are the rest.
    const middle = [out[3]!, out[4]!, 0];
    middle[2] = n - middle[0]! - middle[1]!;
    let chi2 = 0;
    for (let a = 0; a < 3; a++) {
      const expected = n * p[3 + a]! * p[a * 3 + 2]! / p2;
      chi2 += (middle[a]! - expected) ** 2 / expected;
    }
    expect(chi2).toBeLessThan(13.82); // χ²(2) upper 0.001 point
  });
});

describe('the data-augmentation sampler', () => {
  const fit = { ...fitWithCounts(['a', 'b', 'c'], [[20, 5, 2], [3, 15, 6], [0, 4, 18]], 'jeffreys', [['c', 'a']]),
    gapCounts: [[0, 1, 2, 6], [0, 2, 2, 4], [1, 0, 2, 3], [2, 2, 2, 9], [0, 0, 3, 5], [2, 1, 3, 2], [1, 2, 4, 3]] as GapCell[] };
  const settings = { chains: 4, warmUp: 100, retained: 800, thin: 1 };

  it('gives identical retained sweeps for the same seed, and other ones for another seed', () => {
    const a = augment(fit, settings, randomStreams(11).stream('augment'));
    const b = augment(fit, settings, randomStreams(11).stream('augment'));
    const c = augment(fit, settings, randomStreams(12).stream('augment'));
    expect(Array.from(a.latent)).toEqual(Array.from(b.latent));
    expect(Array.from(a.latent)).not.toEqual(Array.from(c.latent));
    expect(a.retained).toBe(800);
  });

  it('keeps structural zeros empty and g one-step transitions per pair in every sweep', () => {
    const a = augment(fit, settings, randomStreams(1).stream('augment'));
    const steps = fit.gapCounts.reduce((s, [, , g, n]) => s + g * n, 0);
    for (let r = 0; r < a.retained; r++) {
      const sweep = a.latent.subarray(r * 9, r * 9 + 9);
      expect(sweep[6]).toBe(0);
      expect(sweep.reduce((x, y) => x + y, 0)).toBe(steps);
    }
    expect(Number.isNaN(a.rhat[6]!)).toBe(true);
    for (let c = 0; c < 9; c++) if (c !== 6) expect(a.rhat[c]!).toBeLessThan(1.05);
  });

  it('centres the posterior near the EM answer: posterior means within 0.05 of the MLE (test/reference/gap-mle.py) in every cell', () => {
    // A loose check of location only (prior 0.5, 91 pairs): the calibration is tested in test/slow/gap-sbc.test.ts.
    const a = augment(fit, { chains: 2, warmUp: 200, retained: 2000, thin: 1 }, randomStreams(2).stream('augment'));
    const summary = mixturePosteriorSummary(fit.counts, Float64Array.from([0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0, 0.5, 0.5]), 3, 0.9, a.latent, a.retained);
    const mle = [0.67574482691, 0.228393161662, 0.0958620114285, 0.184792360018, 0.563978094707, 0.251229545275, 0, 0.134012094953, 0.865987905047];
    summary.mean.forEach((m, c) => expect(Math.abs(m - mle[c]!)).toBeLessThan(0.05));
  });

  it('posterior draws: same seed → identical draws; every draw a stochastic matrix with the structural zero', () => {
    const one = posteriorDraws(fit, 300, randomStreams(5));
    const two = posteriorDraws(fit, 300, randomStreams(5));
    expect(Array.from(one.data)).toEqual(Array.from(two.data));
    for (let d = 0; d < 300; d++) {
      expect(one.data[d * 9 + 6]).toBe(0);
      for (let i = 0; i < 3; i++) expect(one.data.subarray(d * 9 + i * 3, d * 9 + i * 3 + 3).reduce((x, y) => x + y, 0)).toBeCloseTo(1, 12);
    }
  });
});

describe('the exact mixture summary', () => {
  it('is the closed-form Beta summary of the completed counts when there is one retained sweep', () => {
    const counts = Float64Array.from([20, 5, 2, 3, 15, 6, 0, 4, 18]);
    const latent = Float64Array.from([4, 3, 1, 2, 6, 0, 0, 1, 9]);
    const alpha = Float64Array.from([0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0, 0.5, 0.5]);
    const mixture = mixturePosteriorSummary(counts, alpha, 3, 0.9, latent, 1);
    const closed = posteriorSummary(counts.map((x, c) => x + latent[c]!), alpha, 3, 0.9);
    for (let c = 0; c < 9; c++) {
      expect(mixture.mean[c]).toBeCloseTo(closed.mean[c]!, 12);
      expect(mixture.low[c]).toBeCloseTo(closed.low[c]!, 7);
      expect(mixture.high[c]).toBeCloseTo(closed.high[c]!, 7);
    }
  });
});

describe('split-R̂ and bulk ESS (Vehtari et al. 2021)', () => {
  const normals = (seed: number, n: number): Float64Array => {
    const r = randomStreams(seed);
    return Float64Array.from({ length: n }, () => { const u = r.uniform() || 1e-300; return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * r.uniform()); });
  };

  it('independent draws: R̂ near 1 and ESS near the number of draws', () => {
    const d = convergence([1, 2, 3, 4].map((s) => normals(s, 1000)));
    expect(d.rhat).toBeLessThan(1.01);
    expect(d.ess).toBeGreaterThan(3200);
    expect(d.ess).toBeLessThan(4800);
  });

  it('AR(1) chains with ρ = 0.9: ESS near N(1 − ρ)/(1 + ρ) (the AR(1) integrated autocorrelation time, e.g. Geyer 1992)', () => {
    const chains = [1, 2, 3, 4].map((s) => {
      const e = normals(s + 10, 5000);
      const x = new Float64Array(5000);
      x[0] = e[0]! / Math.sqrt(1 - 0.81);
      for (let t = 1; t < 5000; t++) x[t] = 0.9 * x[t - 1]! + e[t]!;
      return x;
    });
    const d = convergence(chains);
    const want = 20000 * 0.1 / 1.9; // ≈ 1053
    expect(d.ess).toBeGreaterThan(0.75 * want);
    expect(d.ess).toBeLessThan(1.25 * want);
    expect(d.rhat).toBeLessThan(1.01);
  });

  it('chains around different centres: R̂ well above 1.01', () => {
    const d = convergence([0, 1, 2, 3].map((s) => normals(s + 20, 500).map((x) => x + s)));
    expect(d.rhat).toBeGreaterThan(1.5);
  });
});
