import { describe, expect, it } from 'vitest';
import { carriedMix, latestSurveyedMix } from '../../src/chain/latest-mix.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import { runForecast } from '../../src/engine/forecast.js';
import { fitMle } from '../../src/fit/fit.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { fitWithCounts, scenarioFor } from '../helpers.js';

describe('sites not surveyed at the latest time are carried forward', () => {
  // A: 2020 a, 2021 b, 2022 b (surveyed at the latest time); B: 2020 a, 2021 a (1 step back); C: 2019 b, 2020 a (2 steps back).
  const records = [['A', 2020, 0], ['A', 2021, 1], ['A', 2022, 1], ['B', 2020, 0], ['B', 2021, 0], ['C', 2019, 1], ['C', 2020, 0]] as const;
  const table = tableFromRecords('t.csv', ['a', 'b'], records.map(([site, time, state], n) => ({ site, time, state, line: n + 2 })));

  it('lists them by last state and whole steps back; a last survey not whole steps back is counted apart', () => {
    const mix = latestSurveyedMix(table.rows, 2);
    expect(mix).toMatchObject({ time: 2022, counts: [0, 1], sites: 1, notCarried: 0 });
    expect(mix.carried).toEqual([{ state: 0, steps: 1, sites: 1 }, { state: 0, steps: 2, sites: 1 }]);
    // With 2-year steps, B (1 year back) cannot be carried; C (2 years back) can.
    expect(latestSurveyedMix(table.rows, 2, 2)).toMatchObject({ carried: [{ state: 0, steps: 1, sites: 1 }], notCarried: 1 });
  });

  it('start each from e_s·Pᵍ: by hand with P = [[0.6, 0.4], [0.1, 0.9]]', () => {
    const mix = latestSurveyedMix(table.rows, 2);
    const out = carriedMix(mix, [0.6, 0.4, 0.1, 0.9], 2, 0, new Float64Array(2));
    // A in b; B: (0.6, 0.4); C: (0.6, 0.4)·P = (0.40, 0.60). Over three sites.
    expect(out[0]).toBeCloseTo((0 + 0.6 + 0.4) / 3, 15);
    expect(out[1]).toBeCloseTo((1 + 0.4 + 0.6) / 3, 15);
  });

  const fit = { ...fitWithCounts(['a', 'b'], [[30, 20], [5, 45]]),
    latest: { time: 2022, counts: [0, 10], shares: [0, 1], sites: 10, carried: [{ state: 0, steps: 3, sites: 10 }], notCarried: 0 } };

  it('the engine starts every draw from its own carried-forward mix (point source: the MLE, exactly)', () => {
    const scenario = { ...scenarioFor(fit, { source: 'point', draws: 1 }),
      start: { year: 2022, shares: carriedMix(fit.latest, fitMle(fit).p, 2, 0, new Float64Array(2)), from: 'latest' as const, carried: fit.latest.carried } };
    const r = runForecast(scenario, randomStreams(1));
    const p = fitMle(fit).p;
    const want = carriedMix(fit.latest, p, 2, 0, new Float64Array(2));
    expect(r.shares[0]!.median[0]).toBeCloseTo(want[0]!, 14);
    expect(r.shares[1]!.median[0]).toBeCloseTo(want[1]!, 14);
  });

  it('with posterior draws the start itself is uncertain (a band of positive width at step 0); without carried sites it is exact', () => {
    const carried = { ...scenarioFor(fit, { draws: 400 }),
      start: { year: 2022, shares: carriedMix(fit.latest, fitMle(fit).p, 2, 0, new Float64Array(2)), from: 'latest' as const, carried: fit.latest.carried } };
    const r = runForecast(carried, randomStreams(2));
    expect(r.shares[0]!.high[0]! - r.shares[0]!.low[0]!).toBeGreaterThan(0.01);
    const plain = runForecast({ ...scenarioFor(fit, { draws: 400 }), start: { year: 2022, shares: Float64Array.from([0.5, 0.5]), from: 'latest' } }, randomStreams(2));
    expect(plain.shares[0]!.high[0]! - plain.shares[0]!.low[0]!).toBe(0);
  });
});
