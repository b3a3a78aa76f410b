import { describe, expect, it } from 'vitest';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import { fitWithCounts } from '../helpers.js';
import { check, expectClose, toleranceOf } from '../reference/checks.js';

describe('posterior draws of the transition matrix', () => {
  const D = 20000;
  const counts = [[51, 11, 8], [12, 31, 9], [6, 11, 10]];
  const fit = fitWithCounts(['a', 'b', 'c'], counts, 'jeffreys');
  const draws = posteriorDraws(fit, D, randomStreams(12345));

  it('has sample mean and second moment of every cell within 4 standard errors of the Dirichlet closed forms', () => {
    // Marginal of cell (i, j): Beta(α, α₀ − α), α = n + 0.5. Mean α/α₀; E[p²] = α(α+1)/(α₀(α₀+1))
    // (the variance check goes through the second moment). 4 SE: per-check false alarm ≈ 6e-5.
    for (let i = 0; i < 3; i++) {
      const a0 = counts[i]!.reduce((x, y) => x + y, 0) + 1.5;
      for (let j = 0; j < 3; j++) {
        const a = counts[i]![j]! + 0.5;
        let m1 = 0; let m2 = 0; let m4 = 0;
        for (let d = 0; d < D; d++) { const p = draws.data[d * 9 + i * 3 + j]!; m1 += p; m2 += p * p; m4 += p ** 4; }
        m1 /= D; m2 /= D; m4 /= D;
        const mean = a / a0;
        const second = (a * (a + 1)) / (a0 * (a0 + 1));
        const seMean = Math.sqrt((second - mean * mean) / D);
        const seSecond = Math.sqrt((m4 - m2 * m2) / D);
        expect(Math.abs(m1 - mean)).toBeLessThan(4 * seMean);
        expect(Math.abs(m2 - second)).toBeLessThan(4 * seSecond);
      }
    }
  });

  it('gives rows that are non-negative and sum to 1', () => {
    let smallest = Infinity;
    let worstSum = 0;
    for (let r = 0; r < D * 3; r++) {
      let s = 0;
      for (let j = 0; j < 3; j++) { const p = draws.data[r * 3 + j]!; smallest = Math.min(smallest, p); s += p; }
      worstSum = Math.max(worstSum, Math.abs(s - 1));
    }
    expect(smallest).toBeGreaterThanOrEqual(0);
    expect(worstSum).toBeLessThan(1e-12);
  });

  it('keeps structural zeros at exactly zero in every draw', () => {
    const f = fitWithCounts(['a', 'b', 'c'], counts, 'jeffreys', [['a', 'c'], ['c', 'b']]);
    const d = posteriorDraws(f, 2000, randomStreams(9));
    for (let n = 0; n < 2000; n++) {
      expect(d.data[n * 9 + 2]).toBe(0);
      expect(d.data[n * 9 + 7]).toBe(0);
    }
  });

  it('draws a row with no data from the prior alone (Dirichlet(0.5, 0.5, 0.5): mean 1/3 each)', () => {
    const f = fitWithCounts(['a', 'b', 'c'], [[5, 1, 0], [0, 0, 0], [1, 1, 1]]);
    const d = posteriorDraws(f, 20000, randomStreams(3));
    // Beta(0.5, 1) marginal: mean 1/3, sd = sqrt(0.5·1/(1.5²·2.5)) ≈ 0.298; SE over 20000 draws ≈ 0.0021.
    for (let j = 0; j < 3; j++) {
      let m = 0;
      for (let n = 0; n < 20000; n++) m += d.data[n * 9 + 3 + j]!;
      expect(Math.abs(m / 20000 - 1 / 3)).toBeLessThan(4 * 0.0021);
    }
  });

  it('matches the Dirichlet poll posterior of Gelman et al. BDA3 sec. 3.4 (727/583/137, uniform prior)', () => {
    const c = check('dirichlet_posterior_poll');
    const counts3 = c.inputs['counts'] as number[];
    const f = fitWithCounts(['bush', 'dukakis', 'other'], [counts3, [1, 1, 1], [1, 1, 1]], 'uniform');
    const n = 20000;
    const d = posteriorDraws(f, n, randomStreams(2024));
    const diffs = Float64Array.from({ length: n }, (_, k) => d.data[k * 9]! - d.data[k * 9 + 1]!);
    const mean = diffs.reduce((a, b) => a + b, 0) / n;
    const sd = Math.sqrt(diffs.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1));
    // Monte Carlo error of the mean ≈ 0.0248/√20000 ≈ 0.00018, inside the check's 0.0002 tolerance;
    // that of the sd ≈ 0.0248/√(2·20000) ≈ 0.00012, so the sd gets 4 of those (0.0008 ≈ 4 × 0.0002).
    expectClose(mean, c.expected['diff_theta1_theta2_mean_mc'], toleranceOf(c, 'diff_theta1_theta2_mean_mc'), 'mean diff');
    expectClose(sd, c.expected['diff_theta1_theta2_sd_mc'], 4 * toleranceOf(c, 'diff_theta1_theta2_sd_mc'), 'sd diff');
  });

  it('never returns NaN for tiny Dirichlet parameters', () => {
    const out = new Float64Array(3);
    const random = randomStreams(1);
    for (let n = 0; n < 5000; n++) {
      sampleDirichlet(random, [1e-4, 1e-4, 1e-4], 0, 3, out, 0);
      expect(Math.abs(out[0]! + out[1]! + out[2]! - 1)).toBeLessThan(1e-12);
    }
  });

  it('pins seeded values (a change here is a value-breaking change: note it in CHANGELOG.md)', () => {
    const d = posteriorDraws(fitWithCounts(['a', 'b'], [[3, 1], [2, 5]]), 2, randomStreams(42));
    // Reproduced independently by test/reference/seeded-posterior.py (Python, exact 64-bit integers,
    // from the published algorithms): `python3 test/reference/seeded-posterior.py`.
    expect(Array.from(d.data).map((x) => x.toFixed(12))).toEqual([
      '0.509954110174', '0.490045889826', '0.391862978100', '0.608137021900',
      '0.863329298961', '0.136670701039', '0.402572662937', '0.597427337063',
    ]);
  });
});
