import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { propagate } from '../../src/engine/propagate.js';
import { runForecast } from '../../src/engine/forecast.js';
import { TARGET_TOLERANCE } from '../../src/engine/target.js';
import type { LandscapeTarget } from '../../src/scenario/scenario.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { atLeast, drawsOf, fitWithCounts, mathjsProjection, mixOf, scenarioFor, stochasticMatrix } from '../helpers.js';

/** Reference, from mathjs matrix powers: first step of a run of m met steps, and the run at the horizon. */
function reference(P: number[][], x0: number[], horizon: number, t: LandscapeTarget): { first: number; run: number } {
  let first = -1; let start = -1;
  for (let step = 0; step <= horizon; step++) {
    const x = mathjsProjection(x0, P, step);
    const sum = t.states.reduce((a, s) => a + x[s]!, 0);
    const met = t.bound === 'at-least' ? sum >= t.threshold - TARGET_TOLERANCE : sum <= t.threshold + TARGET_TOLERANCE;
    if (!met) { start = -1; continue; }
    if (start < 0) start = step;
    if (first < 0 && step - start + 1 >= t.staysMet) first = start;
  }
  return { first, run: start < 0 ? 0 : horizon - start + 1 };
}

const problem = fc.integer({ min: 2, max: 6 }).chain((k) => fc.record({
  P: stochasticMatrix(k),
  x0: mixOf(k),
  states: fc.uniqueArray(fc.integer({ min: 0, max: k - 1 }), { minLength: 1, maxLength: k }),
  bound: fc.constantFrom('at-least' as const, 'at-most' as const),
  threshold: fc.double({ min: 0, max: 1, noNaN: true }),
  staysMet: fc.integer({ min: 1, max: 6 }),
  horizon: fc.integer({ min: 1, max: 15 }),
}));

describe('landscape targets in the engine', () => {
  it('finds the first year of a run and the run at the horizon as mathjs matrix powers do (property)', () => {
    fc.assert(fc.property(problem, ({ P, x0, states, bound, threshold, staysMet, horizon }) => {
      const target = { states, bound, threshold, staysMet };
      const paths = propagate(drawsOf([P]), x0, horizon, { target });
      const want = reference(P, x0, horizon, target);
      expect(paths.firstAtTarget[0]).toBe(want.first);
      expect(paths.targetRunAtHorizon[0]).toBe(want.run);
    }), { numRuns: 300 });
  });

  it('a set of one state is the single-state target: the first year its share reaches the threshold (property)', () => {
    fc.assert(fc.property(problem, ({ P, x0, states, threshold, horizon }) => {
      const s = states[0]!;
      const paths = propagate(drawsOf([P, P]), x0, horizon, { target: { states: [s], bound: 'at-least', threshold, staysMet: 1 } });
      let first = -1;
      for (let t = 0; t <= horizon && first < 0; t++) if (mathjsProjection(x0, P, t)[s]! >= threshold - TARGET_TOLERANCE) first = t;
      expect(Array.from(paths.firstAtTarget)).toEqual([first, first]);
    }), { numRuns: 200 });
  });

  it('stays_met 1 is no stays_met, and a longer run is reached no earlier and in no more draws (property)', () => {
    fc.assert(fc.property(problem, ({ P, x0, states, bound, threshold, staysMet, horizon }) => {
      const run = (m: number) => propagate(drawsOf([P]), x0, horizon, { target: { states, bound, threshold, staysMet: m } });
      const once = run(1);
      // No stays_met: the first year it is met at all.
      let first = -1;
      for (let t = 0; t <= horizon && first < 0; t++) if (reference(P, x0, t, { states, bound, threshold, staysMet: 1 }).run > 0) first = t;
      expect(once.firstAtTarget[0]).toBe(first);
      const longer = run(staysMet);
      if (longer.firstAtTarget[0]! >= 0) expect(longer.firstAtTarget[0]).toBeGreaterThanOrEqual(once.firstAtTarget[0]!);
      expect(longer.targetRunAtHorizon[0]).toBe(once.targetRunAtHorizon[0]);
    }), { numRuns: 200 });
  });

  it('at_most 1 is met at the start, and every year, in every draw (property)', () => {
    const fit = fitWithCounts(['a', 'b', 'c', 'd'], [[20, 5, 1, 0], [3, 30, 6, 2], [0, 4, 25, 9], [1, 0, 7, 40]]);
    fc.assert(fc.property(mixOf(4), fc.uniqueArray(fc.integer({ min: 0, max: 3 }), { minLength: 1, maxLength: 4 }), fc.integer({ min: 1, max: 4 }),
      (x0, states, staysMet) => {
        const r = runForecast(scenarioFor(fit, { draws: 60, horizonSteps: 6, start: { year: 2000, shares: Float64Array.from(x0), from: 'given' },
          target: { states, bound: 'at-most', threshold: 1, staysMet } }), randomStreams(5));
        expect(r.dominance).toMatchObject({ alreadyMet: true, probability: 1, draws: 60, holdsAtHorizon: 1, holdsThroughout: 1, shortAtHorizon: 0 });
        // Counted from its first year: no first-year band, since the first year is the start itself…
        if (staysMet === 1) expect(r.dominance!.year).toBeNull();
        // …unless it must also stay met, when the first run starts at the start in every draw.
        else expect(r.dominance!.year).toEqual({ median: 2000, low: 2000, high: 2000 });
      }), { numRuns: 25 });
  });

  it('counts a run still too short at the horizon as not reached, and says how many draws that is', () => {
    // From all-a: b's share after t steps is 1 − 0.5ᵗ, at or above 0.8 from t = 3 on (0.875).
    const P = [[0.5, 0.5], [0, 1]];
    const run = (m: number) => propagate(drawsOf([P]), [1, 0], 5, { target: atLeast(1, 0.8, m) });
    expect([run(1).firstAtTarget[0], run(3).firstAtTarget[0], run(4).firstAtTarget[0]]).toEqual([3, 3, -1]);
    expect(run(4).targetRunAtHorizon[0]).toBe(3); // steps 3, 4, 5
    const fit = fitWithCounts(['a', 'b'], [[50, 50], [0, 100]]);
    const r = runForecast(scenarioFor(fit, { source: 'point', draws: 50, horizonSteps: 5, target: atLeast(1, 0.8, 4),
      start: { year: 2000, shares: Float64Array.from([1, 0]), from: 'given' } }), randomStreams(1));
    expect(r.dominance).toMatchObject({ alreadyMet: false, probability: 0, draws: 0, year: null, holdsAtHorizon: 1, holdsThroughout: 0, shortAtHorizon: 50 });
  });

  it('a cap on a set of states is met while their summed share stays at or below it', () => {
    // b + c start at 0.2 and grow as 1 − 0.8·0.5ᵗ: 0.2, 0.6, 0.8, …; a cap of 0.6 holds at steps 0 and 1 only.
    const P = [[0.5, 0.25, 0.25], [0, 1, 0], [0, 0, 1]];
    const paths = propagate(drawsOf([P]), [0.8, 0.1, 0.1], 4, { target: { states: [1, 2], bound: 'at-most', threshold: 0.6, staysMet: 1 } });
    expect(paths.firstAtTarget[0]).toBe(0);
    expect(paths.targetRunAtHorizon[0]).toBe(0);
  });
});
