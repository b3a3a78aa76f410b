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
  const encoded = histories.map((h) => Int32Array.from(h.flatMap(([at, state]) => [at, state, 0])));
  const shared = new Int32Array(3); // one shared error matrix: every scored survey through matrix 0

  it('are the mean over draws of (filtered true state)·Pᵍ·E, each draw with its own P and E (mathjs as the independent reference)', () => {
    const D = 4;
    const got = recordedPredictive(draws(D), cases, encoded, shared, PI, randomStreams(3));
    cases.forEach((c, n) => {
      const expected = [0, 1, 2].map((r) => (reference(P1, E1, histories[n]!, c.gap)[r]! + reference(P2, E2, histories[n]!, c.gap)[r]!) / 2);
      for (let r = 0; r < 3; r++) expect(got.probabilities[n * 3 + r]).toBeCloseTo(expected[r]!, 12);
    });
    // Site b's one record: α ∝ π ⊙ E[·, 2]; by hand for draw 1, α = [0.05, 0.045, 0.14]/0.235.
    const alpha = [0.05, 0.045, 0.14].map((x) => x / 0.235);
    const byHand = [0, 1, 2].map((r) => [0, 1, 2].reduce((a, x) => a + alpha[x]! * [0, 1, 2].reduce((b, y) => b + P1[x]![y]! * E1[y]![r]!, 0), 0));
    const first = recordedPredictive(draws(1), cases, encoded, shared, PI, randomStreams(3));
    for (let r = 0; r < 3; r++) expect(first.probabilities[3 + r]).toBeCloseTo(byHand[r]!, 12);
  });

  it('draw every site\'s record per draw: counts add up to the sites, and their mean is the summed predictive (simulation)', () => {
    const D = 20000;
    const got = recordedPredictive(draws(D), cases, encoded, shared, PI, randomStreams(5));
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

// One error matrix per observer: per draw the pooled matrix (index 0) and observers A (1) and B (2), each far from the others.
const EA1 = [[0.95, 0.05, 0], [0.02, 0.9, 0.08], [0, 0.05, 0.95]];
const EA2 = [[0.85, 0.1, 0.05], [0.1, 0.85, 0.05], [0.05, 0.05, 0.9]];
const EB1 = [[0.5, 0.4, 0.1], [0.3, 0.5, 0.2], [0.1, 0.3, 0.6]];
const EB2 = [[0.6, 0.3, 0.1], [0.4, 0.4, 0.2], [0.2, 0.2, 0.6]];

function observerDraws(n: number): MatrixDraws {
  const pick = <T>(d: number, a: T, b: T): T => (d % 2 === 0 ? a : b);
  return {
    ...draws(n),
    observerEmissions: Float64Array.from(Array.from({ length: n }, (_, d) => [pick(d, E1, E2), pick(d, EA1, EA2), pick(d, EB1, EB2)].flat(2)).flat()),
    observers: ['A', 'B'],
  };
}

/** The mathjs reference with each survey's own matrix: filter with E of each survey, then α·Pᵍ·E_target. */
function observerReference(P: number[][], Es: number[][][], history: [number, number, number][], gap: number, target: number): number[] {
  const column = (E: number[][], r: number) => E.map((row) => row[r]!);
  const normalise = (v: number[]) => { const t = v.reduce((a, b) => a + b, 0); return v.map((x) => x / t); };
  let alpha = normalise(dotMultiply(PI, column(Es[history[0]![2]]!, history[0]![1])) as number[]);
  for (let n = 1; n < history.length; n++) {
    const moved = ((multiply(matrix([alpha]), pow(matrix(P), history[n]![0] - history[n - 1]![0])) as Matrix).toArray() as number[][])[0]!;
    alpha = normalise(dotMultiply(moved, column(Es[history[n]![2]]!, history[n]![1])) as number[]);
  }
  return ((multiply(multiply(matrix([alpha]), pow(matrix(P), gap)), matrix(Es[target]!)) as Matrix).toArray() as number[][])[0]!;
}

describe('per-site predictions on the recorded scale with one error matrix per observer', () => {
  // Site a: surveyed by A, B, A; scored survey by B. Site b: one survey by B, scored by A. Site c: a's
  // record but scored by A: a different q. Site d: a's states all by the pooled matrix (an unassessed observer).
  const histories: [number, number, number][][] = [
    [[0, 0, 1], [1, 1, 2], [3, 1, 1]], [[0, 2, 2]], [[0, 0, 1], [1, 1, 2], [3, 1, 1]], [[0, 0, 0], [1, 1, 0], [3, 1, 0]],
  ];
  const targets = Int32Array.from([2, 1, 1, 0]);
  const cases: SiteCase[] = [
    { site: 'a', from: 1, gap: 2, to: 2 }, { site: 'b', from: 2, gap: 1, to: 0 }, { site: 'c', from: 1, gap: 2, to: 1 }, { site: 'd', from: 1, gap: 2, to: 1 },
  ];
  const encoded = histories.map((h) => Int32Array.from(h.flat()));
  const [drawOne, drawTwo] = [[E1, EA1, EB1], [E2, EA2, EB2]];
  const expected = (n: number): number[] => {
    const one = observerReference(P1, drawOne!, histories[n]!, cases[n]!.gap, targets[n]!);
    const two = observerReference(P2, drawTwo!, histories[n]!, cases[n]!.gap, targets[n]!);
    return one.map((x, r) => (x + two[r]!) / 2);
  };

  it('are the mean over two draws of α·Pᵍ·E_obs, each survey filtered through its own observer\'s E of the draw (mathjs as the independent reference)', () => {
    const got = recordedPredictive(observerDraws(2), cases, encoded, targets, PI, randomStreams(3));
    cases.forEach((_, n) => {
      const want = expected(n);
      for (let r = 0; r < 3; r++) expect(got.probabilities[n * 3 + r]).toBeCloseTo(want[r]!, 12);
    });
    // Sites a and c share the record, not the scored survey's observer: their forecasts differ.
    expect(Math.abs(got.probabilities[0]! - got.probabilities[6]!)).toBeGreaterThan(0.01);
    // Site d's surveys all went through the pooled matrix: the one-matrix result for a's record.
    const pooled = [0, 1, 2].map((r) => (reference(P1, E1, histories[0]!.map(([a, s]) => [a, s]), 2)[r]! + reference(P2, E2, histories[0]!.map(([a, s]) => [a, s]), 2)[r]!) / 2);
    for (let r = 0; r < 3; r++) expect(got.probabilities[9 + r]).toBeCloseTo(pooled[r]!, 12);
  });

  it('scoreSites reads each record\'s observer: assessed ones through their own matrix, an unassessed one through the pooled matrix', () => {
    const records: SurveyRecord[] = [
      { site: 'a', time: 2010, state: 0, observer: 'A', line: 2 }, { site: 'a', time: 2011, state: 1, observer: 'B', line: 3 },
      { site: 'a', time: 2013, state: 1, observer: 'A', line: 4 }, { site: 'a', time: 2015, state: 2, observer: 'B', line: 5 },
      { site: 'b', time: 2014, state: 2, observer: 'B', line: 6 }, { site: 'b', time: 2015, state: 0, observer: 'A', line: 7 },
      { site: 'd', time: 2010, state: 0, observer: 'Z', line: 8 }, { site: 'd', time: 2011, state: 1, observer: 'Z', line: 9 },
      { site: 'd', time: 2013, state: 1, observer: 'Z', line: 10 }, { site: 'd', time: 2015, state: 1, observer: 'Z', line: 11 },
    ];
    const at = { origin: 2014, target: 2015, step: 1, originCounts: [0, 0, 1], level: 0.9, initial: PI };
    const scored = scoreSites(observerDraws(2), records, at, randomStreams(1))!;
    expect(scored.sites).toBe(3);
    const [pa, pb, pd] = [expected(0)[2]!, expected(1)[0]!, expected(3)[1]!];
    expect(scored.chain.log).toBeCloseTo((-Math.log(pa) - Math.log(pb) - Math.log(pd)) / 3, 12);
    // The same records through the pooled matrix alone (the draws without per-observer matrices) score differently.
    const { observerEmissions: _o, ...pooledOnly } = observerDraws(2);
    expect(scoreSites(pooledOnly, records, at, randomStreams(1))!.chain.log).not.toBeCloseTo(scored.chain.log, 3);
  });
});
