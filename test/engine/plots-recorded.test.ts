import { matrix, multiply, type Matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { simulate } from '../../src/engine/simulate.js';
import { mixAt } from '../../src/engine/layout.js';
import type { MatrixDraws } from '../../src/uncertainty/draws.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { fitWithCounts, mathjsProjection, scenarioFor, everyDraw } from '../helpers.js';

// Plot counts "as recorded": each draw's true plots pass through that draw's error matrix E.
const P = [[0.8, 0.15, 0.05], [0.1, 0.7, 0.2], [0.05, 0.1, 0.85]];
// Two error matrices far from the identity (row = true, column = recorded), one per half of the draws.
const E1 = [[0.7, 0.2, 0.1], [0.25, 0.6, 0.15], [0, 0.3, 0.7]];
const E2 = [[0.9, 0.1, 0], [0.05, 0.9, 0.05], [0.1, 0.1, 0.8]];
const fit = fitWithCounts(['bare', 'grass', 'shrub'], [[40, 10, 0], [5, 30, 15], [2, 4, 36]]);
const H = 6;
// 15 plots: small enough that the tolerances below are a few standard errors wide.
const N = 15;
/** The plots at the start, as the scenario gives them (their shares are near, not equal to, x₀). */
const START_PLOTS = [10, 3, 2];
const x0 = [0.7, 0.2, 0.1];
const D = 4000;

/** Point draws of P with each draw's E set by hand: draws below D/2 take E1, the rest E2. */
function drawsWithErrors(): MatrixDraws {
  const data = everyDraw(P, D);
  const emissions = Float64Array.from(Array.from({ length: D }, (_, d) => (d < D / 2 ? E1 : E2).flat()).flat());
  return { k: 3, count: D, data, source: 'point', notes: [], emissions };
}

const scenario = (scale?: 'true' | 'recorded') => scenarioFor(fit, {
  horizonSteps: H, showSteps: [0, H], draws: D,
  start: { year: 2020, shares: Float64Array.from(x0), from: 'given' },
  plots: { total: N, start: START_PLOTS, ...(scale ? { scale } : {}) },
});

function meanAt(counts: Int32Array, layout: { draws: number; slots: number; k: number }, t: number, from: number, to: number): number[] {
  const mean = [0, 0, 0];
  for (let d = from; d < to; d++) mixAt(counts, layout, d, t).forEach((n, s) => { mean[s]! += n / (to - from); });
  return mean;
}

describe('plot counts as recorded (through each draw\'s error matrix)', () => {
  it('have mean (start plots · Pᵗ) · E, with each draw\'s own E (mathjs as the independent reference)', () => {
    const sim = simulate(scenario('recorded'), drawsWithErrors(), randomStreams(7));
    const plots = sim.plots!;
    for (let d = 0; d < D; d++) expect(mixAt(plots.counts, plots, d, H).reduce((a, b) => a + b, 0)).toBe(N);
    // The plots move from their own start counts, so the reference starts there too (not from N·x₀).
    const trueCounts = mathjsProjection(START_PLOTS, P, H);
    const expected = (E: number[][]) => ((multiply(matrix([trueCounts]), matrix(E)) as Matrix).toArray() as number[][])[0]!;
    // The sd of a count of 15 plots is at most √(15/4) ≈ 1.9; over 2000 draws the mean's sd is ≤ 0.043: allow 0.2 (≈ 4.6 sd).
    meanAt(plots.counts, plots, H, 0, D / 2).forEach((m, s) => expect(Math.abs(m - expected(E1)[s]!)).toBeLessThan(0.2));
    meanAt(plots.counts, plots, H, D / 2, D).forEach((m, s) => expect(Math.abs(m - expected(E2)[s]!)).toBeLessThan(0.2));
    // At the start the plots are the 10, 3, 2 given, recorded: [10 3 2]·E1 = [7 + 0.75, 2 + 1.8 + 0.6, 1 + 0.45 + 1.4] = [7.75, 4.4, 2.85] (by hand).
    meanAt(plots.counts, plots, 0, 0, D / 2).forEach((m, s) => expect(Math.abs(m - [7.75, 4.4, 2.85][s]!)).toBeLessThan(0.2));
  });

  it('as true (the default) ignore the error matrix: the counts are those drawn without it, number for number', () => {
    const withE = simulate(scenario('true'), drawsWithErrors(), randomStreams(7)).plots!.counts;
    const draws = drawsWithErrors();
    const { emissions: _dropped, ...withoutE } = draws;
    const plain = simulate(scenario(), withoutE, randomStreams(7)).plots!.counts;
    expect(Array.from(withE)).toEqual(Array.from(plain));
    // …and recorded without an error matrix is the same again (the records are taken as the truth).
    const recordedNoE = simulate(scenario('recorded'), withoutE, randomStreams(7)).plots!.counts;
    expect(Array.from(recordedNoE)).toEqual(Array.from(plain));
    // The true mean is (start plots)·Pᴴ, not the recorded one: the scales really differ here.
    const trueMean = mathjsProjection(START_PLOTS, P, H);
    meanAt(withE, { draws: D, slots: 2, k: 3 }, H, 0, D).forEach((m, s) => expect(Math.abs(m - trueMean[s]!)).toBeLessThan(0.2));
  });

  it('are the same for the same seed, and differ for another', () => {
    const a = simulate(scenario('recorded'), drawsWithErrors(), randomStreams(7)).plots!.counts;
    const b = simulate(scenario('recorded'), drawsWithErrors(), randomStreams(7)).plots!.counts;
    const c = simulate(scenario('recorded'), drawsWithErrors(), randomStreams(8)).plots!.counts;
    expect(Array.from(a)).toEqual(Array.from(b));
    expect(Array.from(a)).not.toEqual(Array.from(c));
  });
});
