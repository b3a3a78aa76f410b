import { describe, expect, it } from 'vitest';
import { multiply, matrix, type Matrix } from 'mathjs';
import { sitePredictive } from '../../src/evaluation/site-predictive.js';
import { siteCases } from '../../src/evaluation/site-cases.js';
import { climatologyForecast, persistenceForecast } from '../../src/evaluation/baselines.js';
import { skill } from '../../src/evaluation/scores.js';
import { scoreSites, summariseScores } from '../../src/evaluation/site-scores.js';
import { hindcast } from '../../src/evaluation/hindcast.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import type { SurveyRecord } from '../../src/data/survey.js';
import { drawsOf, simulatedSurveys } from '../helpers.js';

const power = (P: number[][], g: number): number[][] => {
  let m: Matrix = matrix(P);
  for (let n = 1; n < g; n++) m = multiply(m, matrix(P)) as Matrix;
  return m.toArray() as number[][];
};

describe('per-site posterior predictive', () => {
  const A = [[0.9, 0.1], [0.2, 0.8]];
  const B = [[0.5, 0.5], [0.6, 0.4]];

  it('is the mean over draws of the row of each draw\'s P^g, not a row of the mean matrix to the g', () => {
    const cases = [{ site: 'x', from: 0, gap: 3, to: 1 }, { site: 'y', from: 1, gap: 1, to: 1 }];
    const p = sitePredictive(drawsOf([A, B]), cases, randomStreams(1).stream('sites'));
    const expected = [0, 1].map((j) => (power(A, 3)[0]![j]! + power(B, 3)[0]![j]!) / 2);
    expect(p.probabilities[0]).toBeCloseTo(expected[0]!, 14);
    expect(p.probabilities[1]).toBeCloseTo(expected[1]!, 14);
    expect(p.probabilities[3]).toBeCloseTo((0.8 + 0.4) / 2, 14);
    // (mean P)³ from state 0 gives 0.583 to stay, the mean of the powers (0.781 + 0.545)/2 = 0.663: the difference matters.
    const mean = [[0.7, 0.3], [0.4, 0.6]];
    expect(power(mean, 3)[0]![0]).toBeCloseTo(0.583, 12);
    expect(p.probabilities[0]).toBeCloseTo(0.663, 12);
    expect(Math.abs(p.probabilities[0]! - power(mean, 3)[0]![0]!)).toBeGreaterThan(0.03);
    // One simulated end state per site and draw.
    expect(p.counts.reduce((a, b) => a + b, 0)).toBe(2 * 2);
  });

  it('simulated counts follow the predictive probabilities', () => {
    const cases = Array.from({ length: 40 }, (_, i) => ({ site: `s${i}`, from: 0, gap: 2, to: 0 }));
    const draws = drawsOf(Array.from({ length: 2000 }, () => A));
    const p = sitePredictive(draws, cases, randomStreams(2).stream('sites'));
    // Binomial(40, 0.83) per draw (row 0 of A² = [0.83, 0.17]): mean 33.2, sd 2.38; the mean of 2000 draws has sd 0.053.
    let total = 0;
    for (let d = 0; d < 2000; d++) total += p.counts[d]!;
    expect(total / 2000).toBeGreaterThan(33.2 - 0.2);
    expect(total / 2000).toBeLessThan(33.2 + 0.2);
  });
});

describe('baselines and skill', () => {
  it('smooth by ½ per state (worked by hand)', () => {
    // Persistence from state 1 with N = 8 sites at the origin, k = 3: (8·[j = 1] + ½) / (8 + 1.5).
    expect(Array.from(persistenceForecast(1, 8, 3))).toEqual([0.5 / 9.5, 8.5 / 9.5, 0.5 / 9.5]);
    expect(Array.from(climatologyForecast([6, 2, 0]))).toEqual([6.5 / 9.5, 2.5 / 9.5, 0.5 / 9.5]);
  });

  it('skill is 1 − S/S_ref, undefined against a perfect reference', () => {
    expect(skill(0.5, 2)).toBe(0.75);
    expect(skill(3, 2)).toBe(-0.5);
    expect(skill(0.1, 0)).toBeNull();
  });
});

describe('which sites are scored', () => {
  const r = (site: string, time: number, state: number): SurveyRecord => ({ site, time, state, line: 0 });
  it('each site surveyed at the target, from its latest survey at or before the origin', () => {
    const records = [r('b', 2010, 0), r('b', 2012, 1), r('a', 2011, 2), r('a', 2012, 0), r('c', 2013, 1), r('d', 2011, 1), r('d', 2012, 2)];
    // b: from 2012 (state 1); a: from 2012; c: never surveyed by 2012 → unscored; d: not surveyed at 2013 → not a case.
    expect(siteCases([...records, r('a', 2013, 1), r('b', 2013, 1)], 2012, 2013, 1))
      .toEqual({ cases: [{ site: 'a', from: 0, gap: 1, to: 1 }, { site: 'b', from: 1, gap: 1, to: 1 }], unscored: 1 });
    // Origin 2011: b was last seen in 2010, two steps before the target.
    expect(siteCases([...records, r('b', 2013, 0)], 2011, 2013, 1).cases).toEqual([{ site: 'b', from: 0, gap: 3, to: 0 }]);
    // With 2-year steps, b's gap of 3 years is not whole steps, and c has no survey by 2010: both unscored.
    expect(siteCases([...records, r('b', 2013, 0)], 2010, 2013, 2)).toEqual({ cases: [], unscored: 2 });
  });

  it('scores one site by hand: log and Brier of the chain and both baselines', () => {
    const records = [r('a', 1, 0), r('b', 1, 0), r('c', 1, 1), r('a', 2, 1)];
    const s = scoreSites(drawsOf([[[0.9, 0.1], [0.2, 0.8]]]), records, { origin: 1, target: 2, step: 1, originCounts: [2, 1], level: 0.9 },
      randomStreams(3).stream('sites'))!;
    expect(s.sites).toBe(1);
    expect(s.chain.log).toBeCloseTo(-Math.log(0.1), 14);
    expect(s.chain.brier).toBeCloseTo(0.9 ** 2 + 0.9 ** 2, 14);
    // Persistence from state 0, N = 3: [3.5, 0.5] / 4; climatology [2.5, 1.5] / 4.
    expect(s.persistence.log).toBeCloseTo(-Math.log(0.5 / 4), 14);
    expect(s.climatology.log).toBeCloseTo(-Math.log(1.5 / 4), 14);
    expect(s.climatology.brier).toBeCloseTo(2 * (2.5 / 4) ** 2, 14);
    const summary = summariseScores([s, { ...s, sites: 3, chain: { log: 0, brier: 0 } }], 0.9);
    // Pooled over sites (1 + 3), skill from the pooled means.
    expect(summary.chain.log).toBeCloseTo(-Math.log(0.1) / 4, 14);
    expect(summary.skill.log.persistence).toBeCloseTo(1 - (-Math.log(0.1) / 4) / -Math.log(0.5 / 4), 14);
    expect(summary.coverage.bands).toBe(4);
  });
});

describe('per-site scores on data simulated from a known chain', () => {
  it('the chain beats persistence and climatology, and comes close to the true matrix', () => {
    const truth = [[0.8, 0.15, 0.05], [0.1, 0.75, 0.15], [0.05, 0.1, 0.85]];
    const table = simulatedSurveys(randomStreams(11).stream('surveys'), truth, 150, 8);
    const { cases, summary } = hindcast(table, DEFAULT_FIT_SETTINGS, { horizons: [1, 3], draws: 300, level: 0.9, random: randomStreams(12) });
    for (const s of summary) {
      expect(s.skill.log.persistence!).toBeGreaterThan(0);
      expect(s.skill.log.climatology!).toBeGreaterThan(0);
      expect(s.skill.brier.persistence!).toBeGreaterThan(0);
      expect(s.skill.brier.climatology!).toBeGreaterThan(0);
    }
    // The same sites scored with the true matrix (the best any forecast can do on average): the
    // fitted chain's per-site log score is within 0.03 nats of it, one step ahead.
    const oneStep = cases.filter((c) => c.steps === 1);
    let trueLog = 0;
    let n = 0;
    for (const c of oneStep) {
      for (const x of siteCases(table.records, c.origin, c.target, 1).cases) { trueLog -= Math.log(power(truth, x.gap)[x.from]![x.to]!); n += 1; }
    }
    expect(n).toBe(summary[0]!.sites);
    expect(Math.abs(summary[0]!.chain.log - trueLog / n)).toBeLessThan(0.03);
  });
});
