import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { addBridgeExpectations } from '../../src/chain/bridges.js';
import { forwardBackward, mostLikelyPath } from '../../src/chain/forward-backward.js';
import { mixOf, stochasticMatrix } from '../helpers.js';

/** Every hidden path enumerated: likelihood, marginals, expected transitions, best path. */
function bruteForce(pi: number[], p: number[][], e: number[][]): { likelihood: number; gamma: number[][]; transitions: number[][]; best: number[]; bestP: number } {
  const k = pi.length;
  const T = e.length;
  const gamma = e.map(() => pi.map(() => 0));
  const transitions = p.map((row) => row.map(() => 0));
  let likelihood = 0;
  let best: number[] = [];
  let bestP = -1;
  const walk = (path: number[]): void => {
    if (path.length === T) {
      let w = pi[path[0]!]! * e[0]![path[0]!]!;
      for (let t = 1; t < T; t++) w *= p[path[t - 1]!]![path[t]!]! * e[t]![path[t]!]!;
      likelihood += w;
      path.forEach((s, t) => { gamma[t]![s] += w; });
      for (let t = 1; t < T; t++) transitions[path[t - 1]!]![path[t]!] += w;
      if (w > bestP) { bestP = w; best = [...path]; }
      return;
    }
    for (let s = 0; s < k; s++) walk([...path, s]);
  };
  walk([]);
  return { likelihood, gamma: gamma.map((r) => r.map((x) => x / likelihood)), transitions: transitions.map((r) => r.map((x) => x / likelihood)), best, bestP };
}

describe('scaled forward–backward and the most likely path', () => {
  it('agree with brute-force enumeration of every hidden path (k = 2–3, 2–6 steps, random emissions)', () => {
    fc.assert(fc.property(fc.integer({ min: 2, max: 3 }).chain((k) => fc.tuple(mixOf(k), stochasticMatrix(k),
      fc.array(fc.array(fc.integer({ min: 1, max: 100 }), { minLength: k, maxLength: k }), { minLength: 2, maxLength: 6 }))), ([pi, p, raw]) => {
      const k = pi.length;
      const e = raw.map((row) => row.map((x) => x / 100));
      const want = bruteForce(pi, p, e);
      fc.pre(want.likelihood > 0);
      const got = forwardBackward(pi, p.flat(), k, Float64Array.from(e.flat()));
      expect(got.logLikelihood).toBeCloseTo(Math.log(want.likelihood), 10);
      Array.from(got.gamma).forEach((x, c) => expect(x).toBeCloseTo(want.gamma[Math.floor(c / k)]![c % k]!, 10));
      Array.from(got.transitions).forEach((x, c) => expect(x).toBeCloseTo(want.transitions[Math.floor(c / k)]![c % k]!, 10));
      const viterbi = mostLikelyPath(pi, p.flat(), k, Float64Array.from(e.flat()));
      expect(viterbi.logProbability).toBeCloseTo(Math.log(want.bestP), 10);
    }), { numRuns: 80 });
  });

  it('on the ice-cream example of Jurafsky & Martin (Speech and Language Processing, 3rd ed. draft, Appendix A: hidden Markov models), 3 1 3 ice creams', () => {
    // HOT, COLD; π = (0.8, 0.2); A = [[0.6, 0.4], [0.5, 0.5]]; P(1|H) = 0.2, P(3|H) = 0.4, P(1|C) = 0.5, P(3|C) = 0.1.
    // Their forward trellis (Fig. A.5) gives α₂(H) = .0404 and α₂(C) = .069, and the Viterbi trellis
    // (Fig. A.8) v₂(H) = .0384, v₂(C) = .064 — values from memory of the figures, and reproduced by
    // hand here: α₂(H) = (.32·.6 + .02·.5)·.2, α₂(C) = (.32·.4 + .02·.5)·.5.
    const pi = [0.8, 0.2];
    const p = [0.6, 0.4, 0.5, 0.5];
    const e = Float64Array.from([0.4, 0.1, 0.2, 0.5, 0.4, 0.1]);
    const two = forwardBackward(pi, p, 2, e.slice(0, 4));
    expect(Math.exp(two.logLikelihood)).toBeCloseTo(0.0404 + 0.069, 12);
    const v = mostLikelyPath(pi, p, 2, e.slice(0, 4));
    expect(Math.exp(v.logProbability)).toBeCloseTo(0.064, 12);
    expect(Array.from(v.path)).toEqual([0, 1]);
    // All three days: forward = (α₂ · A) · e₃ summed; the best path HOT, COLD, HOT? Brute force decides.
    const three = forwardBackward(pi, p, 2, e);
    const brute = bruteForce(pi, [[0.6, 0.4], [0.5, 0.5]], [[0.4, 0.1], [0.2, 0.5], [0.4, 0.1]]);
    expect(Math.exp(three.logLikelihood)).toBeCloseTo(brute.likelihood, 14);
    expect(Array.from(mostLikelyPath(pi, p, 2, e).path)).toEqual(brute.best);
  });

  it('with exact surveys at both ends and nothing between, its expected transitions are the bridge E-step (bridges.ts)', () => {
    const p = Float64Array.from([0.6, 0.3, 0.1, 0.2, 0.5, 0.3, 0, 0.25, 0.75]);
    const g = 4;
    const e = new Float64Array((g + 1) * 3).fill(1);
    e.fill(0, 0, 3); e[0] = 1; // seen in state 0 at the start
    e.fill(0, g * 3, g * 3 + 3); e[g * 3 + 2] = 1; // seen in state 2 at the end
    const fb = forwardBackward([1, 0, 0], p, 3, e);
    const bridge = new Float64Array(9);
    const ll = addBridgeExpectations(p, 3, [[0, 2, g, 1]], bridge);
    expect(fb.logLikelihood).toBeCloseTo(ll, 12);
    Array.from(fb.transitions).forEach((x, c) => expect(x).toBeCloseTo(bridge[c]!, 12));
  });

  it('does not underflow on a long sequence (2,000 steps of weak emissions)', () => {
    const T = 2000;
    const e = new Float64Array(T * 2);
    for (let t = 0; t < T; t++) { e[t * 2] = 0.01; e[t * 2 + 1] = 0.02; }
    const fb = forwardBackward([0.5, 0.5], [0.9, 0.1, 0.2, 0.8], 2, e);
    expect(Number.isFinite(fb.logLikelihood)).toBe(true);
    expect(fb.logLikelihood).toBeLessThan(-7000);
    for (let t = 0; t < T; t++) expect(fb.gamma[t * 2]! + fb.gamma[t * 2 + 1]!).toBeCloseTo(1, 12);
  });
});
