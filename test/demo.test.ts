import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { generateSurveys, TRUE_MATRIX } from '../scenarios/brenhollow/generate.js';
import { loadScenario } from '../src/scenario/load-scenario.js';
import { maximumLikelihood } from '../src/chain/estimates.js';
import { fitPrior } from '../src/fit/fit.js';

describe('the invented Brenhollow demo', () => {
  it('surveys.csv is exactly what the generator makes from the stated true matrix and seed', () => {
    expect(generateSurveys()).toBe(readFileSync('scenarios/brenhollow/surveys.csv', 'utf8'));
  });

  it('the true matrix is row-stochastic', () => {
    for (const row of TRUE_MATRIX) expect(Math.abs(row.reduce((a, b) => a + b, 0) - 1)).toBeLessThan(1e-12);
  });

  it('both demo scenarios load, and the fit recovers the true matrix roughly (60 plots, 9 years)', () => {
    for (const name of ['no-action', 'new-cell']) {
      const s = loadScenario(`scenarios/brenhollow/${name}.yaml`);
      expect(s.fit.sites).toHaveLength(60);
      const { p } = maximumLikelihood(s.fit.counts, fitPrior(s.fit), 5);
      // With 35–150 transitions per row, every MLE cell lies within 0.11 of the truth (binomial sd ≤ 0.085).
      TRUE_MATRIX.forEach((row, i) => row.forEach((v, j) => expect(Math.abs(p[i * 5 + j]! - v)).toBeLessThan(0.11)));
    }
  });
});
