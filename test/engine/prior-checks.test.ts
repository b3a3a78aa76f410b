import { describe, expect, it } from 'vitest';
import { stationaryOfObservedRows } from '../../src/engine/stationary-draws.js';
import { priorSensitivity, SENSITIVITY_PRIORS } from '../../src/engine/prior-sensitivity.js';
import { runForecast } from '../../src/engine/forecast.js';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import type { MatrixDraws } from '../../src/uncertainty/draws.js';

const draws = (...matrices: number[][]): MatrixDraws =>
  ({ k: 3, count: matrices.length, data: Float64Array.from(matrices.flat()), source: 'point', notes: [] });

describe('long-run mix without the states never surveyed as a from-state', () => {
  it('restricts each draw to the surveyed rows (worked by hand)', () => {
    // Restricted to a, b: [[.625, .375], [.5, .5]]; π_a·.375 = π_b·.5, so π = (4/7, 3/7).
    const o = stationaryOfObservedRows(draws([0.5, 0.3, 0.2, 0.4, 0.4, 0.2, 1 / 3, 1 / 3, 1 / 3]), [5, 3, 2, 4, 4, 2, 0, 0, 0])!;
    expect(o.dropped).toEqual([2]);
    expect(o.stationary.unique).toBe(1);
    const mix = Array.from(o.stationary.mixes);
    expect(mix[0]).toBeCloseTo(4 / 7, 14);
    expect(mix[1]).toBeCloseTo(3 / 7, 14);
    expect(mix[2]).toBe(0);
  });

  it('counts draws where the restriction is undefined, and is null when every row was surveyed', () => {
    const o = stationaryOfObservedRows(draws([0.5, 0.5, 0, 0, 0, 1, 0, 0, 1], [0.5, 0.3, 0.2, 0.4, 0.4, 0.2, 0, 0, 1]), [5, 3, 2, 4, 4, 2, 0, 0, 0])!;
    expect([o.undefinedDraws, o.stationary.unique, o.stationary.notUnique]).toEqual([1, 1, 0]);
    expect(stationaryOfObservedRows(draws([0.5, 0.5, 0, 0, 0.5, 0.5, 0.5, 0, 0.5]), [1, 1, 0, 0, 1, 1, 1, 0, 1])).toBeNull();
  });

  it('a forecast reports both mixes when a state was never a from-state', () => {
    const s = loadScenario('test/fixtures/scenarios/never-from.yaml');
    const r = runForecast(s, randomStreams(s.seed!));
    expect(r.observedRows!.dropped).toEqual([2]);
    expect(r.observedRows!.unique).toBe(r.draws);
    // The never-surveyed state takes a share of the full mix from its prior row alone; without it, a and b share everything.
    expect(r.stationary.bands![2]!.median).toBeGreaterThan(0.1);
    expect(r.observedRows!.bands![2]!.high).toBe(0);
    expect(r.observedRows!.bands![0]!.median + r.observedRows!.bands![1]!.median).toBeCloseTo(1, 1);
    expect(r.priorSensitivity.map((p) => [p.reliance.state, p.reliance.reason])).toEqual([[2, 'never-from']]);
  });
});

describe('prior sensitivity from posterior means', () => {
  const s = loadScenario('scenarios/brenhollow/no-action.yaml');
  const k = 5;
  /** Posterior mean under pseudo-count a, built by hand from the demo counts and its two structural zeros. */
  const meanMatrix = (a: number): number[] => {
    const c = Array.from(s.fit.counts);
    const impossible = new Set([3, 20]);
    const m = c.map((n, i) => (impossible.has(i) ? 0 : n + a));
    for (let i = 0; i < k; i++) {
      const sum = m.slice(i * k, i * k + k).reduce((x, y) => x + y, 0);
      for (let j = 0; j < k; j++) m[i * k + j]! /= sum;
    }
    return m;
  };
  const step = (x: number[], p: number[]): number[] => x.map((_, j) => x.reduce((acc, xi, i) => acc + xi * p[i * k + j]!, 0));

  it('rank-grass and high-marsh under priors 0.1, 0.5, 1: horizon by plain matrix powers, long run by power iteration', () => {
    const sens = priorSensitivity(s, randomStreams(1));
    expect(sens.map((p) => s.fit.states[p.reliance.state])).toEqual(['high-marsh', 'rank-grass']);
    SENSITIVITY_PRIORS.forEach((a, n) => {
      const p = meanMatrix(a);
      let x = Array.from(s.start.shares);
      for (let t = 0; t < s.horizonSteps; t++) x = step(x, p);
      let pi = new Array<number>(k).fill(1 / k);
      for (let t = 0; t < 200_000; t++) pi = step(pi, p);
      for (const e of sens) {
        expect(e.horizon[n]).toBeCloseTo(x[e.reliance.state]!, 10);
        expect(e.longRun[n]).toBeCloseTo(pi[e.reliance.state]!, 6);
      }
    });
    // What is assumption: rank-grass's long-run share moves from 76% to 28% with the prior alone.
    const rank = sens[1]!.longRun as number[];
    expect(rank[0]).toBeGreaterThan(rank[1]!);
    expect(rank[1]).toBeGreaterThan(rank[2]!);
    expect(rank[0]! - rank[2]!).toBeGreaterThan(0.4);
  });
});
