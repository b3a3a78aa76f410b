import { describe, expect, it } from 'vitest';
import { periodStandout } from '../../src/diagnostics/period-standout.js';
import { assumptionTests, MAX_PERIOD_BLOCKS } from '../../src/diagnostics/assumption-tests.js';
import { stratifiedIndependence } from '../../src/chain/contingency.js';
import { homogeneity } from '../../src/chain/markov-tests.js';
import { chiSquareUpperTail } from '../../src/chain/chi-square.js';
import { variationCheck } from '../../src/diagnostics/variation-check.js';
import { verdict } from '../../src/report/check-verdicts.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { fitWithCounts } from '../helpers.js';
import { simulateRow } from '../variation-helpers.js';
import type { Fit } from '../../src/fit/fit.js';
import type { PeriodCounts } from '../../src/chain/counts.js';

type Cells = [number, number, number][];
const period = (label: string, cells: Cells) => ({ label, cells });

describe('which survey period stands out', () => {
  // Two states; the third period (a fire year, say) sends most of state 0 to state 1.
  const periods = [
    period('2015→2016', [[0, 0, 40], [0, 1, 10], [1, 1, 30], [1, 0, 5]]),
    period('2016→2017', [[0, 0, 42], [0, 1, 9], [1, 1, 28], [1, 0, 6]]),
    period('2017→2018', [[0, 0, 12], [0, 1, 38], [1, 1, 31], [1, 0, 4]]),
    period('2018→2019', [[0, 0, 39], [0, 1, 11], [1, 1, 29], [1, 0, 5]]),
  ];
  const s = periodStandout(periods, 2);

  it('partitions the homogeneity G² by period: the parts add up to the test statistic (Bishop, Fienberg & Holland 1975, ch. 7)', () => {
    const total = stratifiedIndependence(homogeneity(periods.map((p) => p.cells), 2)).g2;
    expect(s.ranked.reduce((sum, c) => sum + c.g2, 0)).toBeCloseTo(total, 10);
  });

  it('ranks the odd year first, and the others agree without it', () => {
    expect(s.ranked[0]!.label).toBe('2017→2018');
    const rest = stratifiedIndependence(homogeneity(periods.filter((p) => p.label !== '2017→2018').map((p) => p.cells), 2));
    expect(s.withoutTop!.g2).toBeCloseTo(rest.g2, 12);
    expect(s.withoutTop!.p).toBeCloseTo(chiSquareUpperTail(rest.g2, rest.df), 12);
    expect(s.withoutTop!.p).toBeGreaterThan(0.05);
  });
});

/** A fit whose periods are given; counts pooled from them. */
function fitWithPeriods(states: string[], periods: PeriodCounts[]): Fit {
  const k = states.length;
  const counts = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  for (const p of periods) for (const [i, j, n] of p.cells) counts[i]![j]! += n;
  return { ...fitWithCounts(states, counts), periods };
}

describe('the periods test on a long record', () => {
  it(`groups hundreds of one-pair periods into ${MAX_PERIOD_BLOCKS} blocks by default, and tests each period when asked`, () => {
    const random = randomStreams(3);
    const periods: PeriodCounts[] = [];
    let state = 0;
    for (let t = 0; t < 365; t++) {
      const next = random.uniform() < (state === 0 ? 0.2 : 0.3) ? 1 - state : state;
      periods.push({ time: t, cells: [[state, next, 1]] });
      state = next;
    }
    const fit = fitWithPeriods(['dry', 'wet'], periods);
    const tests = assumptionTests(fit, { random: random.stream('boot'), replicates: 19, simulateAll: false });
    expect(tests.periods!.strata).toHaveLength(MAX_PERIOD_BLOCKS);
    expect(tests.periodBlocks).toEqual({ periods: 365, blocks: MAX_PERIOD_BLOCKS });
    expect(tests.periods!.strata![0]).toBe('0–35 (to 36)');
    const asked = assumptionTests(fit, { random: random.stream('boot'), replicates: 19, simulateAll: false, periodGroups: [[0, 179], [180, 364]] });
    expect(asked.periods!.strata).toHaveLength(2);
    expect(asked.periodBlocks).toBeNull();
  });
});

describe('verdicts and the concentration in sere check', () => {
  it('one line per test names the evidence or its absence', () => {
    const base = { g2: 1, x2: 1, df: 3, pX2: 0.5, pBootstrap: null, n: 10, cells: 6, smallCells: 0, sparse: false, meaning: 'm' };
    expect(verdict({ ...base, name: 'periods', pG2: 0.001 })).toMatch(/^periods: the survey periods differ \(p = 0\.001\)/);
    expect(verdict({ ...base, name: 'periods', pG2: 0.4 })).toBe('periods: no evidence the survey periods differ (p = 0.400)');
    // A sparse table's verdict rests on its bootstrap p-value.
    expect(verdict({ ...base, name: 'groups', pG2: 0.01, pBootstrap: 0.2 })).toBe('groups: no evidence the groups of sites differ (p = 0.200)');
  });

  it('finds a small κ where years differ, and its band holds the true value (κ = 6, 15 periods of 60)', () => {
    const random = randomStreams(12);
    const row0 = simulateRow([0.7, 0.2, 0.1], 6, 15, 60, random.stream('row0'));
    const row1 = simulateRow([0.1, 0.8, 0.1], 1e12, 15, 60, random.stream('row1'));
    const periods: PeriodCounts[] = Array.from({ length: 15 }, (_, t) => ({
      time: 2000 + t,
      cells: [0, 1, 2].flatMap((j) => [[0, j, row0.counts[t * 3 + j]!], [1, j, row1.counts[t * 3 + j]!]] as Cells).filter(([, , n]) => n > 0) as Cells,
    }));
    const fit = fitWithPeriods(['a', 'b', 'c'], periods);
    const v = variationCheck(fit, 0.9, random.stream('check'))!;
    expect(v[0]!.status).toBe('estimated');
    expect(v[0]!.kappa!.low).toBeLessThan(6);
    expect(v[0]!.kappa!.high).toBeGreaterThan(6);
    expect(v[0]!.mle!).toBeGreaterThan(2);
    expect(v[0]!.mle!).toBeLessThan(20);
    // Row b's years do not vary: its κ is far larger.
    expect(v[1]!.kappa!.median).toBeGreaterThan(5 * v[0]!.kappa!.median);
    expect(v[2]!.status).toBe('few-counts'); // c is never a from-state
    expect(variationCheck(fitWithPeriods(['a', 'b', 'c'], periods.slice(0, 2)), 0.9, random)).toBeNull();
  });
});
