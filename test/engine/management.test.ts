import fc from 'fast-check';
import { matrix, multiply, type Matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { simulate as simulateSummarised, type Simulation } from '../../src/engine/simulate.js';
import type { MatrixDraws } from '../../src/uncertainty/draws.js';
import type { RandomStream } from '../../src/uncertainty/random.js';
import type { Scenario } from '../../src/scenario/scenario.js';
import { mixAt } from '../../src/engine/layout.js';
import { pointDraws } from '../../src/uncertainty/point.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { eventOf, fitWithCounts, mathjsProjection, scenarioFor, treatmentOf } from '../helpers.js';

const counts = [[40, 10, 0], [5, 30, 15], [2, 4, 36]];
const fit = fitWithCounts(['bare', 'grass', 'shrub'], counts);
const mle = counts.map((row) => row.map((n) => n / row.reduce((a, b) => a + b, 0)));
const H = 12;
const x0 = [0.7, 0.2, 0.1];
const base = scenarioFor(fit, { horizonSteps: H, start: { year: 2020, shares: Float64Array.from(x0), from: 'given' } });

/** A simulation that also keeps every draw's mix at every step, [step][state][draw] (the engine keeps none). */
function simulate(scenario: Scenario, draws: MatrixDraws, random: RandomStream): Simulation & { paths: { draws: number; slots: number; k: number; shares: Float64Array } } {
  const kept: Float64Array[] = [];
  const sim = simulateSummarised(scenario, draws, random, { onYear: (_, mixes) => { kept.push(mixes[0]!.slice()); } });
  const shares = new Float64Array(kept.reduce((n, m) => n + m.length, 0));
  kept.reduce((at, m) => { shares.set(m, at); return at + m.length; }, 0);
  return { ...sim, paths: { draws: draws.count, slots: kept.length, k: draws.k, shares } };
}

const sharesAt = (sim: ReturnType<typeof simulate>, d: number, t: number): number[] => mixAt(sim.paths.shares, sim.paths, d, t);

function expectSame(a: number[], b: number[], tol = 1e-12): void {
  a.forEach((x, s) => expect(Math.abs(x - b[s]!)).toBeLessThan(tol));
}

describe('treatments and sub-populations', () => {
  const draws = posteriorDraws(fit, 50, randomStreams(4));
  const seedGrass = { kind: 'multiply' as const, cells: [{ to: 1, value: 2 }] };

  it('a treated fraction near 0 gives the baseline and a fraction of 1 gives full treatment', () => {
    const baseline = simulate(base, draws, randomStreams(1));
    const full = simulate({ ...base, treatments: [treatmentOf(0, seedGrass, H)] }, draws, randomStreams(1));
    const none = simulate({ ...base, treatments: [treatmentOf(0, seedGrass, H, { area: 1e-15 })] }, draws, randomStreams(1));
    const all = simulate({ ...base, treatments: [treatmentOf(0, seedGrass, H, { area: 1 - 1e-15 })] }, draws, randomStreams(1));
    for (const d of [0, 17, 49]) {
      expectSame(sharesAt(none, d, H), sharesAt(baseline, d, H));
      expectSame(sharesAt(all, d, H), sharesAt(full, d, H));
    }
  });

  it('tracks partial area as two sub-populations: after a treatment stops, the treated land keeps its head start', () => {
    // Treat a third of the area for 3 steps, then stop. Exact answer: a third follows the treated
    // matrix for 3 steps then the fitted one; two thirds follow the fitted one throughout.
    const window = new Float64Array(H + 1);
    window.fill(1, 1, 4);
    const point = pointDraws(fit);
    const sim = simulate({ ...base, treatments: [treatmentOf(0, seedGrass, H, { weights: window, area: 1 / 3 })] }, point, randomStreams(1));
    const treated = mle.map((row) => [...row]);
    treated[0] = [40 / 50 * (1 - 0.4) / 0.8, 0.4, 0]; // 10/50 × 2 = 0.4; the rest rescaled: 0.6 to bare
    let inside = mathjsProjection(x0, treated, 3);
    inside = mathjsProjection(inside, mle, H - 3);
    const outside = mathjsProjection(x0, mle, H);
    expectSame(sharesAt(sim, 0, H), inside.map((v, s) => v / 3 + (2 / 3) * outside[s]!));
  });

  it('composes treatments on one row in file order (set, then multiply)', () => {
    const point = pointDraws(fit);
    const sim = simulate({ ...base, treatments: [
      treatmentOf(1, { kind: 'set', cells: [{ to: 2, value: 0.5 }] }, H),
      treatmentOf(1, { kind: 'multiply', cells: [{ to: 2, value: 0.5 }] }, H),
    ] }, point, randomStreams(1));
    // Row grass (0.1, 0.6, 0.3) → set shrub 0.5: (0.0714…, 0.4285…, 0.5) → halve shrub: 0.25, rest ×0.75/0.5.
    const row = [0.1 * 0.5 / 0.7 * 1.5, 0.6 * 0.5 / 0.7 * 1.5, 0.25];
    const P = [mle[0]!, row, mle[2]!];
    expectSame(sharesAt(sim, 0, H), mathjsProjection(x0, P, H));
  });

  it('a periodic sequence of matrices (treatment on odd steps) equals the product over the cycle (mathjs)', () => {
    const odd = new Float64Array(H + 1).map((_, t) => (t % 2 === 1 ? 1 : 0));
    const point = pointDraws(fit);
    const sim = simulate({ ...base, treatments: [treatmentOf(2, { kind: 'move', from: 2, to: 0, share: 0.5 }, H, { weights: odd })] }, point, randomStreams(1));
    const A = mle.map((row) => [...row]);
    A[2] = [mle[2]![0]! + 0.5 * mle[2]![2]!, mle[2]![1]!, 0.5 * mle[2]![2]!];
    const cycle = multiply(matrix(A), matrix(mle)) as Matrix;
    let v: Matrix = matrix([x0]);
    for (let n = 0; n < H / 2; n++) v = multiply(v, cycle) as Matrix;
    expectSame(sharesAt(sim, 0, H), (v.toArray() as number[][])[0]!);
  });
});

describe('disturbance events', () => {
  const flood = [[1, 0, 0], [0.6, 0.4, 0], [0.2, 0.3, 0.5]];

  it('a deterministic event every year equals the analytic product x₀(PE)ᴴ (mathjs)', () => {
    const point = pointDraws(fit);
    const PE = (multiply(matrix(mle), matrix(flood)) as Matrix).toArray() as number[][];
    for (const scope of ['landscape', 'site'] as const) {
      const sim = simulate({ ...base, events: [eventOf(flood, 1, H, scope)] }, point, randomStreams(1));
      expectSame(sharesAt(sim, 0, H), mathjsProjection(x0, PE, H));
    }
  });

  it('a landscape event with chance 0 equals no event (property over seeds)', () => {
    const draws = posteriorDraws(fit, 20, randomStreams(2));
    const baseline = simulate(base, draws, randomStreams(1));
    fc.assert(fc.property(fc.integer({ min: 1, max: 1e9 }), (seed) => {
      const sim = simulate({ ...base, events: [eventOf(flood, 0, H)] }, draws, randomStreams(seed));
      expect(Array.from(sim.paths.shares)).toEqual(Array.from(baseline.paths.shares));
    }), { numRuns: 20 });
  });

  it('site scope uses the mixture (1 − c)I + cE; landscape scope averages to it over many draws', () => {
    const c = 0.3;
    const point = pointDraws(fit, 20000);
    const mixture = flood.map((row, i) => row.map((e, j) => (1 - c) * (i === j ? 1 : 0) + c * e));
    const PM = (multiply(matrix(mle), matrix(mixture)) as Matrix).toArray() as number[][];
    const site = simulate({ ...base, events: [eventOf(flood, c, H, 'site')] }, pointDraws(fit), randomStreams(1));
    expectSame(sharesAt(site, 0, H), mathjsProjection(x0, PM, H));
    const land = simulate({ ...base, events: [eventOf(flood, c, H, 'landscape')] }, point, randomStreams(9));
    const mean = [0, 1, 2].map((s) => { let m = 0; for (let d = 0; d < 20000; d++) m += sharesAt(land, d, H)[s]!; return m / 20000; });
    // Expectation is linear in the event indicator, so E[x_H] equals the site-scope (mixture) path;
    // 20000 draws give a Monte Carlo error well under 0.003 here.
    expectSame(mean, mathjsProjection(x0, PM, H), 0.003);
  });

  it('gives the same event years to every scenario that names the event, for the same seed', () => {
    const point = pointDraws(fit, 200);
    const a = simulate({ ...base, events: [eventOf(flood, 0.2, H, 'landscape', 'storm')] }, point, randomStreams(5));
    const b = simulate({ ...base, events: [eventOf(flood, 0.2, H, 'landscape', 'storm')],
      treatments: [treatmentOf(0, { kind: 'multiply', cells: [{ to: 0, value: 1 }] }, H)] }, point, randomStreams(5));
    expect(Array.from(b.paths.shares)).toEqual(Array.from(a.paths.shares));
  });
});

describe('plot counts', () => {
  it('keeps the number of plots, and its mean follows the share projection (multinomial process noise)', () => {
    const N = 60;
    const sc = { ...base, plots: { total: N, start: [42, 12, 6] }, start: { year: 2020, shares: Float64Array.from([0.7, 0.2, 0.1]), from: 'given' as const } };
    const sim = simulate(sc, pointDraws(fit, 4000), randomStreams(3));
    const counts = sim.plots!.counts;
    const mean = [0, 0, 0];
    for (let d = 0; d < 4000; d++) {
      let total = 0;
      mixAt(counts, sim.plots!, d, H).forEach((n, s) => { total += n; mean[s]! += n / 4000; });
      expect(total).toBe(N);
    }
    // E[counts_H] = N · x₀Pᴴ; the sd of a count is at most √(N/4) ≈ 3.9, so 4000 draws put the mean within 0.25.
    expectSame(mean, mathjsProjection(x0, mle, H).map((v) => v * N), 0.25);
  });
});
