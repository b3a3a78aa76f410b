import { describe, expect, it } from 'vitest';
import { simulate } from '../../src/engine/simulate.js';
import { yearKernel } from '../../src/uncertainty/year-kernel.js';
import { drawMatrices } from '../../src/uncertainty/draw-matrices.js';
import { keyOf, randomStreams } from '../../src/uncertainty/random.js';
import { bandOf } from '../../src/engine/quantiles.js';
import { fitWithCounts, scenarioFor, treatmentOf } from '../helpers.js';

const counts = [[40, 10, 0], [5, 30, 15], [2, 4, 36]];
const fit = fitWithCounts(['bare', 'grass', 'shrub'], counts, 'jeffreys', [['bare', 'shrub']]);
const given = (kappa: number[]) => ({ kind: 'given' as const, concentration: Float64Array.from(kappa) });

describe('a year matrix around a drawn one', () => {
  it('has the drawn row as mean and variance p(1 − p)/(κ + 1) in every cell (Dirichlet moments; BDA3 appendix A)', () => {
    const P = Float64Array.of(0.8, 0.2, 0, 0.1, 0.6, 0.3, 0.05, 0.15, 0.8);
    const kappa = Float64Array.of(5, 40, Infinity);
    const kernel = yearKernel(3, 1);
    kernel.startStream(0, keyOf(randomStreams(31)), 0);
    kernel.setDraw(0, P, 0, kappa, 0);
    const n = 20_000;
    const out = kernel.years;
    const sum = new Float64Array(9);
    const sum2 = new Float64Array(9);
    const sum4 = new Float64Array(9);
    for (let r = 0; r < n; r++) {
      kernel.sample(0, 0);
      for (let c = 0; c < 9; c++) { sum[c] += out[c]!; sum2[c] += out[c]! ** 2; sum4[c] += out[c]! ** 4; }
      expect(out[2]).toBe(0); // a structural zero stays zero
      for (let c = 6; c < 9; c++) expect(out[c]).toBe(P[c]); // κ = ∞: the row is copied
    }
    for (let c = 0; c < 6; c++) {
      const p = P[c]!;
      if (p === 0) continue;
      const k = kappa[Math.floor(c / 3)]!;
      const mean = sum[c]! / n;
      const second = sum2[c]! / n;
      const wantSecond = p * p + (p * (1 - p)) / (k + 1);
      const seMean = Math.sqrt((second - mean * mean) / n);
      const seSecond = Math.sqrt((sum4[c]! / n - second * second) / n);
      // 4 standard errors: each check false-alarms about 6e-5 of the time (fixed seed here).
      expect(Math.abs(mean - p)).toBeLessThan(4 * seMean);
      expect(Math.abs(second - wantSecond)).toBeLessThan(4 * seSecond);
    }
  });
});

describe('forecasts with year-to-year variation', () => {
  const H = 10;
  const start = { year: 2020, shares: Float64Array.of(0.6, 0.3, 0.1), from: 'given' as const };
  const run = (variation: Parameters<typeof drawMatrices>[4], extra = {}) => {
    const scenario = scenarioFor(fit, { horizonSteps: H, start, draws: 2000, ...extra });
    const random = randomStreams(77);
    const draws = drawMatrices(fit, 'posterior', 2000, random.stream('matrices'), variation);
    return { draws, sim: simulate(scenario, draws, random, { record: [H] }) };
  };

  it('κ → ∞ gives the fixed-matrix bands (within 1e-4); a small κ widens them', () => {
    const none = run({ kind: 'none' }).sim;
    const huge = run(given([1e12, 1e12, 1e12])).sim;
    const small = run(given([5, 5, 5])).sim;
    for (let s = 0; s < 3; s++) {
      expect(Math.abs(huge.shares[s]!.median[0]! - none.shares[s]!.median[0]!)).toBeLessThan(1e-4);
      expect(Math.abs(huge.shares[s]!.low[0]! - none.shares[s]!.low[0]!)).toBeLessThan(1e-4);
      expect(Math.abs(huge.shares[s]!.high[0]! - none.shares[s]!.high[0]!)).toBeLessThan(1e-4);
      const width = (x: typeof none) => x.shares[s]!.high[0]! - x.shares[s]!.low[0]!;
      expect(width(small)).toBeGreaterThan(1.2 * width(none));
    }
  });

  it('variation: none leaves the draws exactly as they were (no concentration attached)', () => {
    const none = run({ kind: 'none' }).draws;
    expect(none.concentration).toBeUndefined();
    const infinite = run(given([Infinity, Infinity, Infinity])).draws;
    expect(infinite.concentration).toBeUndefined();
    expect(Array.from(infinite.data)).toEqual(Array.from(none.data));
  });

  it('the year\'s treatment acts on the varied matrix: a set probability holds exactly in every draw', () => {
    // Every site starts as grass; grass → shrub set to 0.4 every year: after one step shrub is 0.4
    // in every draw, although the year's grass row varies (variation first, then the treatment).
    const treatment = treatmentOf(1, { kind: 'set', cells: [{ to: 2, value: 0.4 }] }, H);
    const scenario = { horizonSteps: 1, start: { ...start, shares: Float64Array.of(0, 1, 0) }, treatments: [treatment] };
    const random = randomStreams(5);
    const draws = drawMatrices(fit, 'posterior', 300, random.stream('matrices'), given([3, 3, 3]));
    const mixes: Float64Array[] = [];
    simulate(scenarioFor(fit, { ...scenario, draws: 300 }), draws, random, { onYear: (t, m) => { if (t === 1) mixes.push(m[0]!.slice()); } });
    const shrub = mixes[0]!.subarray(600, 900);
    for (const x of shrub) expect(x).toBeCloseTo(0.4, 12);
    const bare = bandOf(mixes[0]!.slice(0, 300), 0.9);
    expect(bare.high - bare.low).toBeGreaterThan(0.1); // the untreated rest of the row did vary
  });
});
