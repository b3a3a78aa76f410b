import { describe, expect, it } from 'vitest';
import { simulate } from '../../src/engine/simulate.js';
import { drawMatrices } from '../../src/uncertainty/draw-matrices.js';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import type { PeriodCounts } from '../../src/chain/counts.js';
import { fitWithCounts, scenarioFor } from '../helpers.js';

/**
 * Do the bands include the variation between years? Histories are simulated from a hierarchical
 * chain — each year's matrix drawn as Dirichlet(κ·row) around a true matrix, κ = 30 — for 100 sites
 * over 8 survey periods; then 10 more true years give the true mix. The 90% band of a 10-year
 * forecast (1,000 draws, start: the latest surveyed mix) should cover it in 90% ± 3% of
 * (history, state) pairs with variation estimated, and today's model (variation: none) is run on
 * the same histories beside it. 600 histories × 3 states: a binomial sd of 0.7 points if the pairs
 * were independent (they are not quite: a history's shares add up to 1), so ±3 points is about
 * 4 sd around the nominal 90%; the seed is fixed.
 * Measured with 200 histories: 88.5% (polar normals), then 86.0% when gamma variates moved to
 * ziggurat normals — the same distribution, other numbers; the next two sets of 200 gave 86.2% and
 * 90.5%, so 600 histories: 87.6% with variation (today's model 57.2%), about 80 s of CPU. The
 * bands under-cover slightly (by about 2 points, ±0.7): a finding to follow up in the κ model, not
 * a fault of the random numbers (a one-off χ² check of the normals, 200 bins of 2·10⁷ draws, gave 167.5 on about 200 degrees of freedom).
 */
const P = [[0.8, 0.15, 0.05], [0.1, 0.75, 0.15], [0.05, 0.1, 0.85]];
const KAPPA = 30;
const SITES = 100;
const PERIODS = 8;
const HORIZON = 10;

function yearMatrix(random: RandomStream): Float64Array {
  const Y = new Float64Array(9);
  for (let i = 0; i < 3; i++) sampleDirichlet(random, P[i]!.map((p) => p * KAPPA), 0, 3, Y, i * 3);
  return Y;
}

function history(random: RandomStream): { periods: PeriodCounts[]; counts: number[][]; latest: number[]; truth: number[] } {
  const states = Array.from({ length: SITES }, (_, s) => s % 3);
  const counts = [[0, 0, 0], [0, 0, 0], [0, 0, 0]];
  const periods: PeriodCounts[] = [];
  for (let t = 0; t < PERIODS; t++) {
    const Y = yearMatrix(random);
    const cells = new Map<number, number>();
    for (let s = 0; s < SITES; s++) {
      const i = states[s]!;
      let u = random.uniform();
      let j = 0;
      while (j < 2 && (u -= Y[i * 3 + j]!) >= 0) j += 1;
      counts[i]![j]! += 1;
      cells.set(i * 3 + j, (cells.get(i * 3 + j) ?? 0) + 1);
      states[s] = j;
    }
    periods.push({ time: 2000 + t, cells: [...cells].map(([c, n]) => [Math.floor(c / 3), c % 3, n] as [number, number, number]) });
  }
  const latest = [0, 1, 2].map((j) => states.filter((x) => x === j).length / SITES);
  let x = [...latest];
  for (let t = 0; t < HORIZON; t++) {
    const Y = yearMatrix(random);
    x = [0, 1, 2].map((j) => x.reduce((sum, xi, i) => sum + xi * Y[i * 3 + j]!, 0));
  }
  return { periods, counts, latest, truth: x };
}

describe('coverage of forecasts with year-to-year variation (simulated histories)', () => {
  it('90% bands of a 10-year forecast cover the true mix 87–93% of the time with variation estimated; today\'s model beside it', () => {
    const random = randomStreams(2026);
    const HISTORIES = 600;
    let covered = 0;
    let coveredToday = 0;
    let pairs = 0;
    for (let h = 0; h < HISTORIES; h++) {
      const rep = random.stream(`history:${h}`);
      const { periods, counts, latest, truth } = history(rep.stream('truth'));
      const fit = { ...fitWithCounts(['a', 'b', 'c'], counts), periods };
      const scenario = scenarioFor(fit, { horizonSteps: HORIZON, draws: 1000, start: { year: 2008, shares: Float64Array.from(latest), from: 'given' } });
      const band = (variation: { kind: 'estimated' } | { kind: 'none' }) => {
        const r = rep.stream('forecast');
        const draws = drawMatrices(fit, 'posterior', 1000, r.stream('matrices'), variation);
        return simulate(scenario, draws, r, { record: [HORIZON] }).shares;
      };
      const withVariation = band({ kind: 'estimated' });
      const today = band({ kind: 'none' });
      for (let s = 0; s < 3; s++) {
        pairs += 1;
        if (truth[s]! >= withVariation[s]!.low[0]! && truth[s]! <= withVariation[s]!.high[0]!) covered += 1;
        if (truth[s]! >= today[s]!.low[0]! && truth[s]! <= today[s]!.high[0]!) coveredToday += 1;
      }
    }
    console.log(`coverage of 90% bands, 10 years ahead, ${HISTORIES} histories × 3 states: with variation ${(100 * covered / pairs).toFixed(1)}%, today's model ${(100 * coveredToday / pairs).toFixed(1)}%`);
    expect(covered / pairs).toBeGreaterThan(0.87);
    expect(covered / pairs).toBeLessThan(0.93);
    expect(coveredToday / pairs).toBeLessThan(covered / pairs);
  }, 600_000);
});
