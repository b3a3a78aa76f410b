import { describe, expect, it } from 'vitest';
import { runForecast } from '../../src/engine/forecast.js';
import { MIN_BAND_DRAWS } from '../../src/engine/timing-band.js';
import { forecastJson } from '../../src/report/forecast-json.js';
import { bootstrapDraws } from '../../src/uncertainty/bootstrap.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { atLeast, fitWithCounts, mathjsProjection, scenarioFor } from '../helpers.js';
import { SiteCountTable } from '../../src/chain/site-counts.js';

const counts = [[40, 10, 0], [5, 30, 15], [0, 4, 36]];
const fit = fitWithCounts(['bare', 'grass', 'shrub'], counts);

describe('runForecast', () => {
  it("with source 'point' equals p̂ᵗ·x₀ computed with mathjs, bands collapsed", () => {
    const x0 = [0.6, 0.3, 0.1];
    const sc = scenarioFor(fit, { source: 'point', draws: 1, start: { year: 2020, shares: Float64Array.from(x0), from: 'given' } });
    const r = runForecast(sc, randomStreams(1));
    const mle = counts.map((row) => row.map((n) => n / row.reduce((a, b) => a + b, 0)));
    for (let t = 0; t <= 10; t++) {
      const expected = mathjsProjection(x0, mle, t);
      expected.forEach((v, s) => {
        expect(Math.abs(r.shares[s]!.median[t]! - v)).toBeLessThan(1e-12);
        expect(r.shares[s]!.low[t]).toBe(r.shares[s]!.median[t]);
        expect(r.shares[s]!.high[t]).toBe(r.shares[s]!.median[t]);
      });
    }
    expect(r.years).toEqual([2020, 2021, 2022, 2023, 2024, 2025, 2026, 2027, 2028, 2029, 2030]);
  });

  it('gives byte-identical JSON for the same inputs and seed, and different JSON for another seed', () => {
    const sc = scenarioFor(fit, { target: atLeast(2, 0.5) });
    const a = JSON.stringify(forecastJson([runForecast(sc, randomStreams(77))]));
    const b = JSON.stringify(forecastJson([runForecast(sc, randomStreams(77))]));
    const c = JSON.stringify(forecastJson([runForecast(sc, randomStreams(78))]));
    expect(a).toBe(b);
    expect(a).not.toBe(c);
  });

  it('orders every band low ≤ median ≤ high and keeps medians near the point forecast', () => {
    const r = runForecast(scenarioFor(fit, { draws: 4000 }), randomStreams(5));
    const point = runForecast(scenarioFor(fit, { source: 'point', draws: 1 }), randomStreams(5));
    r.shares.forEach((b, s) => b.median.forEach((m, t) => {
      expect(b.low[t]!).toBeLessThanOrEqual(m);
      expect(m).toBeLessThanOrEqual(b.high[t]!);
      // With 50+ transitions per row the posterior median share stays within 0.05 of the MLE path.
      expect(Math.abs(m - point.shares[s]!.median[t]!)).toBeLessThan(0.05);
    }));
  });

  it('reports landscape dominance as a probability and a band of calendar years, from at least 50 draws', () => {
    // 50 copies of the MLE: every draw reaches the target in the same year, so the band is a point.
    const at = (draws: number) => runForecast(scenarioFor(fit, { source: 'point', draws, horizonSteps: 30, target: atLeast(2, 0.5),
      start: { year: 2020, shares: Float64Array.from([1, 0, 0]), from: 'given' } }), randomStreams(1));
    const r = at(MIN_BAND_DRAWS);
    const mle = counts.map((row) => row.map((n) => n / row.reduce((a, b) => a + b, 0)));
    let first = -1;
    for (let t = 0; t <= 30 && first < 0; t++) if (mathjsProjection([1, 0, 0], mle, t)[2]! >= 0.5) first = t;
    expect(first).toBeGreaterThan(0);
    expect(r.dominance).toMatchObject({ probability: 1, draws: 50, alreadyMet: false, holdsAtHorizon: 1, holdsThroughout: 0, shortAtHorizon: 0,
      year: { median: 2020 + first, low: 2020 + first, high: 2020 + first } });
    expect(r.mostCommon[0]).toEqual({ probability: 1, draws: 50, year: { median: 2020, low: 2020, high: 2020 } });
    // One draw short of the floor: the count, no band.
    const few = at(MIN_BAND_DRAWS - 1);
    expect(few.dominance).toMatchObject({ probability: 1, draws: 49, year: null });
    expect(few.mostCommon[0]).toEqual({ probability: 1, draws: 49, year: null });
  });

  it('counts draws without a unique stationary mix instead of averaging them in', () => {
    // Both switches declared impossible: every draw is the identity, with two closed classes.
    const identity = fitWithCounts(['a', 'b'], [[10, 0], [0, 10]], 'jeffreys', [['a', 'b'], ['b', 'a']]);
    const s = runForecast(scenarioFor(identity, { draws: 50 }), randomStreams(3));
    expect(s.stationary).toEqual({ bands: null, unique: 0, notUnique: 50 });
  });
});

describe('site bootstrap', () => {
  it('reproduces the MLE in every draw when all sites are alike', () => {
    const site = { site: 's', cells: [[0, 0, 3], [0, 1, 1], [1, 0, 2], [1, 1, 2]] as [number, number, number][] };
    const f = { ...fitWithCounts(['a', 'b'], [[9, 3], [6, 6]]), sites: SiteCountTable.fromList(2, [site, { ...site, site: 't' }, { ...site, site: 'u' }]) };
    const d = bootstrapDraws(f, 50, randomStreams(4));
    for (let n = 0; n < 50; n++) expect(Array.from(d.data.subarray(n * 4, n * 4 + 4))).toEqual([0.75, 0.25, 0.5, 0.5]);
  });

  it('resamples whole sites: two unlike sites give at most three distinct matrices', () => {
    const one = { site: 'x', cells: [[0, 0, 4], [1, 1, 4], [1, 0, 1]] as [number, number, number][] };
    const two = { site: 'y', cells: [[0, 1, 4], [1, 1, 1], [1, 0, 1]] as [number, number, number][] };
    const f = { ...fitWithCounts(['a', 'b'], [[4, 4], [2, 5]]), sites: SiteCountTable.fromList(2, [one, two]) };
    const d = bootstrapDraws(f, 200, randomStreams(8));
    const distinct = new Set(Array.from({ length: 200 }, (_, n) => Array.from(d.data.subarray(n * 4, n * 4 + 4)).join(',')));
    expect(distinct.size).toBe(3);
    expect(distinct.has('1,0,0.2,0.8')).toBe(true); // both draws of site x: 8/8 stay in a; b: 2 of 10 to a
  });
});
