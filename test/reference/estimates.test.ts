import { describe, expect, it } from 'vitest';
import { maximumLikelihood, posteriorMean, posteriorSummary } from '../../src/chain/estimates.js';
import { check, expectClose, flat, toleranceOf } from './checks.js';
import { toRows } from '../../src/chain/matrix.js';

const uniformPrior = (k: number): Float64Array => new Float64Array(k * k).fill(1);

describe('maximum-likelihood estimate = counts / row sum', () => {
  it('matches Kullback, Kupperman & Ku (1962) counts with the Anderson & Goodman (1957) estimator', () => {
    const c = check('mle_kkk1962_counts');
    const counts = c.inputs['counts'] as number[][];
    const { p, rowsFromPrior, rowsNeverLeft } = maximumLikelihood(flat(counts), uniformPrior(3), 3);
    expectClose(toRows(p, 3), c.expected['P_hat'], toleranceOf(c, 'P_hat'), 'P_hat');
    expect(rowsFromPrior).toEqual([]);
    expect(rowsNeverLeft).toEqual([]);
  });

  it('pools periods by adding counts: Anderson & Goodman (1957) on KKK (1962) Table 9.2', () => {
    const c = check('mle_pooled_two_periods');
    const a = flat(c.inputs['counts_period_1'] as number[][]);
    const b = flat(c.inputs['counts_period_2'] as number[][]);
    const pooled = a.map((x, i) => x + b[i]!);
    const { p } = maximumLikelihood(pooled, uniformPrior(6), 6);
    expectClose(toRows(p, 6), c.expected['P_pooled'], toleranceOf(c, 'P_pooled'), 'P_pooled');
  });

  it('falls back to the prior mean for a row never observed, and flags rows never seen to leave', () => {
    // Hand-made: state 1 never observed as a from-state; state 2 only ever stays.
    const counts = Float64Array.from([3, 1, 0, 0, 0, 0, 0, 0, 4]);
    const alpha = Float64Array.from([0.5, 0.5, 0.5, 0.5, 0.5, 0, 0.5, 0.5, 0.5]);
    const { p, rowsFromPrior, rowsNeverLeft } = maximumLikelihood(counts, alpha, 3);
    expect(Array.from(p)).toEqual([0.75, 0.25, 0, 0.5, 0.5, 0, 0, 0, 1]);
    expect(rowsFromPrior).toEqual([1]);
    expect(rowsNeverLeft).toEqual([2]);
  });
});

describe('exact Beta marginals of the row-wise Dirichlet posterior', () => {
  it('matches scipy.stats.beta.ppf intervals on the KKK counts (check dirichlet_transition_rows_kkk)', () => {
    const c = check('dirichlet_transition_rows_kkk');
    const counts = flat(c.inputs['counts'] as number[][]);
    const s = posteriorSummary(counts, uniformPrior(3), 3, 0.95);
    expectClose(toRows(s.mean, 3), c.expected['posterior_mean'], toleranceOf(c, 'posterior_mean'), 'mean');
    expectClose(toRows(s.low, 3), c.expected['central_95_low'], toleranceOf(c, 'central_95_low'), 'low');
    expectClose(toRows(s.high, 3), c.expected['central_95_high'], toleranceOf(c, 'central_95_high'), 'high');
  });

  it('reproduces Gelman et al. BDA3 sec. 2.4 (placenta previa): Beta(438, 544), 95% interval [0.415, 0.477]', () => {
    const c = check('beta_posterior_placenta_previa');
    // 437 of 980 as a two-state row under a uniform prior: p[0][0] ~ Beta(438, 544).
    const counts = Float64Array.from([437, 543, 1, 1]);
    const s = posteriorSummary(counts, uniformPrior(2), 2, 0.95);
    expectClose(s.mean[0], c.expected['posterior_mean'], toleranceOf(c, 'posterior_mean'), 'mean');
    expectClose([s.low[0], s.high[0]], c.expected['central_95'], toleranceOf(c, 'central_95'), 'central_95');
  });

  it('posteriorMean is (n + α) / Σ(n + α) per row, structural zeros staying 0 (worked by hand)', () => {
    const counts = Float64Array.from([5, 1, 0, 2, 0, 7, 1, 1, 1]);
    const alpha = Float64Array.from([0.5, 0.5, 0, 0.5, 0.5, 0.5, 1, 1, 1]);
    // Row 0: (5.5, 1.5, 0) / 7; row 1: (2.5, 0.5, 7.5) / 10.5; row 2: (2, 2, 2) / 6.
    const want = [5.5 / 7, 1.5 / 7, 0, 2.5 / 10.5, 0.5 / 10.5, 7.5 / 10.5, 1 / 3, 1 / 3, 1 / 3];
    const got = Array.from(posteriorMean(counts, alpha, 3));
    got.forEach((x, c) => expect(Math.abs(x - want[c]!)).toBeLessThan(1e-15));
    expect(got[2]).toBe(0);
  });

  it('gives structural zeros exactly 0 and a single possible destination exactly 1', () => {
    const counts = Float64Array.from([5, 0, 0, 3]);
    const alpha = Float64Array.from([0.5, 0, 0.5, 0.5]);
    const s = posteriorSummary(counts, alpha, 2, 0.9);
    expect([s.mean[0], s.low[0], s.high[0]]).toEqual([1, 1, 1]);
    expect([s.mean[1], s.low[1], s.high[1]]).toEqual([0, 0, 0]);
  });
});
