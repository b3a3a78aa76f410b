import { dotMultiply, matrix, multiply, pow, type Matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { recordedPredictive } from '../../src/evaluation/recorded-predictive.js';
import { scoreSites } from '../../src/evaluation/site-scores.js';
import type { SiteCase } from '../../src/evaluation/site-cases.js';
import type { SurveyRecord } from '../../src/data/survey.js';
import type { MatrixDraws } from '../../src/uncertainty/draws.js';
import { randomStreams } from '../../src/uncertainty/random.js';

// Two draws, each with its own P and E (row = true state, column = recorded), far from the identity.
const P1 = [[0.8, 0.15, 0.05], [0.1, 0.7, 0.2], [0.05, 0.1, 0.85]];
const P2 = [[0.6, 0.3, 0.1], [0.2, 0.6, 0.2], [0, 0.2, 0.8]];
const E1 = [[0.7, 0.2, 0.1], [0.25, 0.6, 0.15], [0, 0.3, 0.7]];
const E2 = [[0.9, 0.1, 0], [0.05, 0.9, 0.05], [0.1, 0.1, 0.8]];
const PI = [0.5, 0.3, 0.2];

function draws(n: number): MatrixDraws {
  const pick = <T>(d: number, a: T, b: T): T => (d % 2 === 0 ? a : b);
  return {
    k: 3, count: n, source: 'point', notes: [],
    data: Float64Array.from(Array.from({ length: n }, (_, d) => pick(d, P1, P2).flat()).flat()),
    emissions: Float64Array.from(Array.from({ length: n }, (_, d) => pick(d, E1, E2).flat()).flat()),
  };
}

/** The independent reference, by mathjs matrix products: the forward filter, then α·Pᵍ·E. */
function reference(P: number[][], E: number[][], history: [number, number][], gap: number): number[] {
  const column = (r: number) => E.map((row) => row[r]!);
  const normalise = (v: number[]) => { const t = v.reduce((a, b) => a + b, 0); return v.map((x) => x / t); };
  let alpha = normalise(dotMultiply(PI, column(history[0]![1])) as number[]);
  for (let n = 1; n < history.length; n++) {
    const moved = ((multiply(matrix([alpha]), pow(matrix(P), history[n]![0] - history[n - 1]![0])) as Matrix).toArray() as number[][])[0]!;
    alpha = normalise(dotMultiply(moved, column(history[n]![1])) as number[]);
  }
  return ((multiply(multiply(matrix([alpha]), pow(matrix(P), gap)), matrix(E)) as Matrix).toArray() as number[][])[0]!;
}

describe('per-site predictions on the recorded scale (observer error)', () => {
  const histories: [number, number][][] = [[[0, 0], [1, 1], [3, 1]], [[0, 2]], [[0, 0], [1, 1], [3, 1]]];
  const cases: SiteCase[] = [
    { site: 'a', from: 1, gap: 2, to: 2 },
    { site: 'b', from: 2, gap: 1, to: 0 },
    { site: 'c', from: 1, gap: 2, to: 1 }, // the same history and gap as a: computed once, the same numbers
  ];
  const encoded = histories.map((h) => Int32Array.from(h.flat()));

  it('are the mean over draws of (filtered true state)·Pᵍ·E, each draw with its own P and E (mathjs as the independent reference)', () => {
    const D = 4;
    const got = recordedPredictive(draws(D), cases, encoded, PI, randomStreams(3));
    cases.forEach((c, n) => {
      const expected = [0, 1, 2].map((r) => (reference(P1, E1, histories[n]!, c.gap)[r]! + reference(P2, E2, histories[n]!, c.gap)[r]!) / 2);
      for (let r = 0; r < 3; r++) expect(got.probabilities[n * 3 + r]).toBeCloseTo(expected[r]!, 12);
    });
    // Site b's one record: α ∝ π ⊙ E[·, 2]; by hand for draw 1, α = [0.05, 0.045, 0.14]/0.235.
    const alpha = [0.05, 0.045, 0.14].map((x) => x / 0.235);
    const byHand = [0, 1, 2].map((r) => [0, 1, 2].reduce((a, x) => a + alpha[x]! * [0, 1, 2].reduce((b, y) => b + P1[x]![y]! * E1[y]![r]!, 0), 0));
    const first = recordedPredictive(draws(1), cases, encoded, PI, randomStreams(3));
    for (let r = 0; r < 3; r++) expect(first.probabilities[3 + r]).toBeCloseTo(byHand[r]!, 12);
  });

  it('draw every site\'s record per draw: counts add up to the sites, and their mean is the summed predictive (simulation)', () => {
    const D = 20000;
    const got = recordedPredictive(draws(D), cases, encoded, PI, randomStreams(5));
    for (let d = 0; d < D; d += 997) expect(got.counts[d]! + got.counts[D + d]! + got.counts[2 * D + d]!).toBe(3);
    for (let r = 0; r < 3; r++) {
      let mean = 0;
      for (let d = 0; d < D; d++) mean += got.counts[r * D + d]! / D;
      const expected = got.probabilities[r]! + got.probabilities[3 + r]! + got.probabilities[6 + r]!;
      // Three sites: the count's sd is at most √(3/4) ≈ 0.87, the mean's over 20,000 draws ≤ 0.0061; allow 0.03 (≈ 5 sd).
      expect(Math.abs(mean - expected)).toBeLessThan(0.03);
    }
  });

  it('scoreSites goes through the error matrix when the draws carry one, says so, and scores from each site\'s whole record', () => {
    const records: SurveyRecord[] = [
      { site: 'a', time: 2010, state: 0, line: 2 }, { site: 'a', time: 2011, state: 1, line: 3 }, { site: 'a', time: 2013, state: 1, line: 4 },
      { site: 'a', time: 2015, state: 2, line: 5 },
      { site: 'b', time: 2014, state: 2, line: 6 }, { site: 'b', time: 2015, state: 0, line: 7 },
    ];
    const at = { origin: 2014, target: 2015, step: 1, originCounts: [0, 0, 1], level: 0.9, initial: PI };
    const scored = scoreSites(draws(2), records, at, randomStreams(1))!;
    expect(scored.scale).toBe('recorded');
    expect(scored.sites).toBe(2);
    // Site a is 2 steps from its last survey (2013), site b 1 step: the same cases as above.
    const pa = (reference(P1, E1, histories[0]!, 2)[2]! + reference(P2, E2, histories[0]!, 2)[2]!) / 2;
    const pb = (reference(P1, E1, histories[1]!, 1)[0]! + reference(P2, E2, histories[1]!, 1)[0]!) / 2;
    expect(scored.chain.log).toBeCloseTo((-Math.log(pa) - Math.log(pb)) / 2, 12);
    // Without error matrices the same records are scored on their own scale, with no scale key.
    const { emissions: _e, ...plain } = draws(2);
    const asTrue = scoreSites(plain, records, at, randomStreams(1))!;
    expect(asTrue.scale).toBeUndefined();
    expect(asTrue.chain.log).not.toBeCloseTo(scored.chain.log, 3);
    // The first-survey mix is required with error matrices: an internal error, not a silent default.
    expect(() => scoreSites(draws(2), records, { ...at, initial: undefined }, randomStreams(1))).toThrow(/first-survey mix/);
  });
});
