import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { generateSurveys, generateZonedSurveys, TRUE_MATRIX, ZONE_MATRICES } from '../scenarios/brenhollow/generate.js';
import { zonePooling } from '../src/fit/zones.js';
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

  it('zoned-surveys.csv is what the generator makes; the zoned scenario fits three zones with partial pooling', () => {
    expect(generateZonedSurveys()).toBe(readFileSync('scenarios/brenhollow/zoned-surveys.csv', 'utf8'));
    for (const m of Object.values(ZONE_MATRICES)) for (const row of m) expect(Math.abs(row.reduce((a, b) => a + b, 0) - 1)).toBeLessThan(1e-12);
    const s = loadScenario('scenarios/brenhollow/zoned.yaml');
    expect(s.fit.zones!.pooling).toBe('partial');
    expect(s.zones!.names).toEqual(['creekside', 'landward', 'midmarsh']);
    // 120, 95 and 210 ha of 425.
    expect(Array.from(s.zones!.shares)).toEqual([120 / 425, 95 / 425, 210 / 425]);
    expect(s.variation.kind).toBe('estimated');
    // Each zone's shrunk rows lie within 0.15 of its own true matrix (30 plots, 9 years: 20–80 transitions a row).
    const { rows } = zonePooling(s.fit);
    s.zones!.names.forEach((name, z) => ZONE_MATRICES[name]!.forEach((row, i) => row.forEach((v, j) => {
      expect(Math.abs(rows[z]![i * 5 + j]! - v)).toBeLessThan(0.15);
    })));
  });
});
