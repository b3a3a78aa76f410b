import { describe, expect, it } from 'vitest';
import { simulate } from '../../src/engine/simulate.js';
import { columnStart } from '../../src/engine/layout.js';
import { discreteBandOf } from '../../src/engine/quantiles.js';
import type { MatrixDraws } from '../../src/uncertainty/draws.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import { fitWithCounts, scenarioFor, everyDraw } from '../helpers.js';

// A known chain and an observer far from perfect (row = true state, column = recorded): half of
// every state is recorded as another.
const P = [[0.8, 0.15, 0.05], [0.1, 0.75, 0.15], [0.05, 0.1, 0.85]];
const E = [[0.5, 0.4, 0.1], [0.1, 0.5, 0.4], [0.4, 0.1, 0.5]];
const START = [13, 1, 1];
const N = 15;
const H = 2;
const D = 4000;
const REPLICATES = 4000;

/** Draws at the known P and E (no parameter uncertainty: what is checked is the recording step and its bands). */
function knownDraws(): MatrixDraws {
  return {
    k: 3, count: D, source: 'point', notes: [],
    data: everyDraw(P, D),
    emissions: everyDraw(E, D),
  };
}

const pick = (random: RandomStream, row: readonly number[]): number => {
  let u = random.uniform();
  for (let j = 0; j < row.length - 1; j++) { if (u < row[j]!) return j; u -= row[j]!; }
  return row.length - 1;
};

/** One future survey, simulated plot by plot (independently of the engine's multinomials): true paths, then each plot recorded. */
function recordedSurvey(random: RandomStream): number[] {
  const seen = [0, 0, 0];
  START.forEach((n, s) => {
    for (let plot = 0; plot < n; plot++) {
      let x = s;
      for (let t = 0; t < H; t++) x = pick(random, P[x]!);
      seen[pick(random, E[x]!)]! += 1;
    }
  });
  return seen;
}

function bandsAtHorizon(scale: 'true' | 'recorded'): { low: number; high: number }[] {
  const fit = fitWithCounts(['a', 'b', 'c'], [[40, 10, 0], [5, 30, 15], [2, 4, 36]]);
  const scenario = scenarioFor(fit, {
    horizonSteps: H, showSteps: [0, H], draws: D, start: { year: 2020, shares: Float64Array.from(START, (n) => n / N), from: 'given' },
    plots: { total: N, start: START, scale },
  });
  const plots = simulate(scenario, knownDraws(), randomStreams(31)).plots!;
  const slot = plots.recorded.indexOf(H);
  return [0, 1, 2].map((s) => {
    const from = columnStart(plots, slot, s);
    return discreteBandOf(plots.counts.slice(from, from + D), 0.9);
  });
}

describe('90% plot bands as recorded, against simulated recorded counts (known P and E)', () => {
  it('cover them about 90% of the time, while bands of the true states under-cover them', () => {
    const recorded = bandsAtHorizon('recorded');
    const truth = bandsAtHorizon('true');
    const random = randomStreams(2026).stream('surveys');
    const inside = { recorded: [0, 0, 0], truth: [0, 0, 0] };
    for (let r = 0; r < REPLICATES; r++) {
      recordedSurvey(random).forEach((n, s) => {
        if (n >= recorded[s]!.low && n <= recorded[s]!.high) inside.recorded[s]! += 1;
        if (n >= truth[s]!.low && n <= truth[s]!.high) inside.truth[s]! += 1;
      });
    }
    const recordedCoverage = inside.recorded.map((n) => n / REPLICATES);
    const trueCoverage = inside.truth.map((n) => n / REPLICATES);
    // Equal-tailed bands of whole counts cover at least their level, up to the discreteness of 15
    // plots (a count's last step of probability mass can be several percent); 4000 replicates put
    // the coverage's standard error near 0.005 and 4000 draws move a band's edge rarely. Accepted:
    // 0.87–0.99 for every state.
    for (const c of recordedCoverage) {
      expect(c).toBeGreaterThan(0.87);
      expect(c).toBeLessThan(0.99);
    }
    // Measured at these seeds: 0.940, 0.939, 0.942 as recorded; the true-state bands 0.539, 0.834, 0.866.
    // The true-state bands sit where the truth is, not where the observer puts it: under 0.75 for some state.
    expect(Math.min(...trueCoverage)).toBeLessThan(0.75);
  });
});
