import { describe, expect, it } from 'vitest';
import { chiSquareUpperTail } from '../../src/chain/chi-square.js';
import { stratifiedIndependence } from '../../src/chain/contingency.js';
import { homogeneity, orderZeroVsOne } from '../../src/chain/markov-tests.js';
import { check, expectClose, flat, toleranceOf } from './checks.js';

const sparse = (rows: number[][]): [number, number, number][] =>
  rows.flatMap((row, i) => row.map((n, j) => [i, j, n] as [number, number, number]).filter(([, , n]) => n > 0));

describe('chi-square upper tail', () => {
  it('brackets the NIST/SEMATECH e-Handbook critical values (sec. 1.3.6.7.4), upper and lower tables, within their 0.001', () => {
    const c = check('chisq_critical_values_nist');
    const tol = toleranceOf(c, 'upper_critical');
    const bracket = (dfs: number[], probs: number[], table: number[][]): void => {
      dfs.forEach((df, r) => probs.forEach((p, col) => {
        const x = table[r]![col]!;
        expect(chiSquareUpperTail(x - tol, df), `df ${df}, p ${p}`).toBeGreaterThanOrEqual(p);
        expect(chiSquareUpperTail(x + tol, df), `df ${df}, p ${p}`).toBeLessThanOrEqual(p);
      }));
    };
    bracket(c.inputs['df_upper'] as number[], c.inputs['alpha_upper'] as number[], c.expected['upper_critical'] as number[][]);
    bracket(c.inputs['df_lower'] as number[], c.inputs['prob_exceed_lower'] as number[], c.expected['lower_critical'] as number[][]);
  });
});

describe('tests of the Markov assumptions', () => {
  it('order 0 vs 1 on the KKK (1962) counts matches scipy.stats.chi2_contingency: X² 43.5915, G² 43.8218, df 4', () => {
    const c = check('test_order0_vs_order1_kkk');
    const stat = stratifiedIndependence(orderZeroVsOne(flat(c.inputs['counts'] as number[][]), 3));
    expectClose(stat.x2, c.expected['X2'], toleranceOf(c, 'X2'), 'X2');
    expectClose(stat.g2, c.expected['G2'], toleranceOf(c, 'G2'), 'G2');
    expect(stat.df).toBe(c.expected['df']);
    expectClose(chiSquareUpperTail(stat.x2, stat.df), c.expected['p_value_X2'], toleranceOf(c, 'p_value_X2'), 'p');
  });

  it('homogeneity of KKK (1962) Table 9.2 across two periods: LR 160.961 (Anderson & Goodman 1957), X² 158.406 (scipy), df 29 with the empty column dropped', () => {
    const c = check('test_homogeneity_kkk1962_table92');
    const tables = homogeneity([sparse(c.inputs['counts_stratum_1'] as number[][]), sparse(c.inputs['counts_stratum_2'] as number[][])], 6);
    const stat = stratifiedIndependence(tables);
    expectClose(stat.g2, c.expected['LR'], toleranceOf(c, 'LR'), 'LR');
    expectClose(stat.x2, c.expected['pearson_X2'], toleranceOf(c, 'pearson_X2'), 'X2');
    // Our convention (BFH 1975 §5.4): rows and columns without data carry no degrees of freedom.
    expect(stat.df).toBe(c.expected['df_dropping_empty_columns']);
    // The published p-value is for the nominal df 30; with it, our upper tail agrees to 1e-21.
    expectClose(chiSquareUpperTail(stat.g2, c.expected['df_nominal'] as number), c.expected['p_value_LR'], toleranceOf(c, 'p_value_LR'), 'p');
  });
});
