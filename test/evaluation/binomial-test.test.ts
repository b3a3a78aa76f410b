import { describe, expect, it } from 'vitest';
import { binomialTwoSidedP, checkCoverage, COVERAGE_ALPHA } from '../../src/evaluation/binomial-test.js';
import { randomStreams } from '../../src/uncertainty/random.js';

describe('exact two-sided binomial test', () => {
  it('matches scipy.stats.binomtest (SciPy 1.17.1, alternative="two-sided")', () => {
    // Reference values printed by: from scipy.stats import binomtest; binomtest(x, n, p).pvalue
    const cases: [number, number, number, number][] = [
      [12, 30, 0.9, 2.625306938630629e-11], [30, 30, 0.9, 0.06821794693712609], [24, 30, 0.9, 0.11558126667509602],
      [88, 100, 0.9, 0.5030177615152565], [99, 100, 0.9, 0.0006336060581826187], [0, 5, 0.9, 9.999999999999989e-6],
      [27, 30, 0.9, 1], [5, 10, 0.5, 1],
    ];
    for (const [x, n, p, ref] of cases) expect(binomialTwoSidedP(x, n, p)).toBeCloseTo(ref, 10);
    for (const [x, n, p, ref] of cases) if (ref > 1e-9) expect(Math.abs(binomialTwoSidedP(x, n, p) / ref - 1)).toBeLessThan(1e-9);
  });

  it('flags fewer or more than the level, and not a count near it', () => {
    expect(checkCoverage(12, 30, 0.9).flag).toBe('fewer');
    expect(checkCoverage(99, 100, 0.9).flag).toBe('more');
    expect(checkCoverage(27, 30, 0.9).flag).toBeNull();
    expect(checkCoverage(0, 0, 0.9)).toMatchObject({ p: 1, flag: null });
  });

  it('raises a false alarm on calibrated bands at most 5% of the time, and catches bands that cover 70%', () => {
    // Calibrated 90% bands: each covers with probability 0.9, independently. 4000 checks of 30 bands;
    // the flag rate's Monte Carlo standard error at 0.05 is 0.0034, so 0.05 + 0.01 is three of them.
    const random = randomStreams(1950).stream('coverage-checks');
    const rate = (coverage: number, checks: number): number => {
      let flagged = 0;
      for (let c = 0; c < checks; c++) {
        let inside = 0;
        for (let b = 0; b < 30; b++) inside += random.uniform() < coverage ? 1 : 0;
        if (checkCoverage(inside, 30, 0.9).flag !== null) flagged += 1;
      }
      return flagged / checks;
    };
    expect(rate(0.9, 4000)).toBeLessThanOrEqual(COVERAGE_ALPHA + 0.01);
    expect(rate(0.7, 1000)).toBeGreaterThan(0.8);
  });
});
