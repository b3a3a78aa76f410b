import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { addBridgeExpectations } from '../../src/chain/bridges.js';
import type { GapCell } from '../../src/chain/counts.js';
import { maximumLikelihood } from '../../src/chain/estimates.js';
import { gapMaximumLikelihood } from '../../src/chain/gap-em.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { stochasticMatrix } from '../helpers.js';

/**
 * Every latent path of a bridge, enumerated: the reference the matrix-form E-step must match.
 * For i → j in g steps, each path i = x₀, x₁ … x_g = j has probability Π P(x_t, x_{t+1}); the
 * bridge's likelihood is their sum and its expected one-step counts the probability-weighted
 * tallies of its steps.
 */
function bruteForce(p: number[][], cells: readonly GapCell[]): { expected: number[][]; logLikelihood: number } {
  const k = p.length;
  const expected = p.map((row) => row.map(() => 0));
  let logLikelihood = 0;
  for (const [i, j, g, n] of cells) {
    const tally = p.map((row) => row.map(() => 0));
    let total = 0;
    const walk = (path: number[]): void => {
      if (path.length === g) {
        const full = [...path, j];
        let w = 1;
        for (let t = 0; t < g; t++) w *= p[full[t]!]![full[t + 1]!]!;
        total += w;
        for (let t = 0; t < g; t++) tally[full[t]!]![full[t + 1]!] += w;
        return;
      }
      for (let s = 0; s < k; s++) walk([...path, s]);
    };
    walk([i]);
    logLikelihood += n * Math.log(total);
    for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) expected[a]![b] += n * tally[a]![b]! / total;
  }
  return { expected, logLikelihood };
}

const flat = (m: number[][]): Float64Array => Float64Array.from(m.flat());

describe('expected one-step counts inside bridges (the E-step)', () => {
  it('equal brute-force enumeration of every latent path on tiny chains (gaps 2 to 5)', () => {
    fc.assert(fc.property(fc.integer({ min: 2, max: 3 }).chain((k) => fc.tuple(
      stochasticMatrix(k),
      fc.array(fc.tuple(fc.integer({ min: 0, max: k - 1 }), fc.integer({ min: 0, max: k - 1 }), fc.integer({ min: 2, max: 5 }), fc.integer({ min: 1, max: 9 })),
        { minLength: 1, maxLength: 6 }),
    )), ([p, raw]) => {
      const k = p.length;
      const cells = [...raw].sort((a, b) => a[2] - b[2]) as GapCell[];
      const want = bruteForce(p, cells);
      fc.pre(Number.isFinite(want.logLikelihood));
      const out = new Float64Array(k * k);
      const ll = addBridgeExpectations(flat(p), k, cells, out);
      expect(ll).toBeCloseTo(want.logLikelihood, 10);
      Array.from(out).forEach((x, c) => expect(x).toBeCloseTo(want.expected[Math.floor(c / k)]![c % k]!, 10));
      // Every bridge of g steps holds g one-step transitions.
      expect(out.reduce((a, b) => a + b, 0)).toBeCloseTo(cells.reduce((a, [, , g, n]) => a + g * n, 0), 9);
    }), { numRuns: 60 });
  });

  it('with a structural zero: the zero cell gets no expected count, and an impossible pair gives −∞', () => {
    const p = [[0.5, 0.5, 0], [0.2, 0.3, 0.5], [0, 0.4, 0.6]];
    const cells: GapCell[] = [[0, 2, 2, 3], [2, 0, 3, 1]];
    const out = new Float64Array(9);
    const ll = addBridgeExpectations(flat(p), 3, cells, out);
    expect(ll).toBeCloseTo(bruteForce(p, cells).logLikelihood, 12);
    expect(out[2]).toBe(0);
    expect(out[6]).toBe(0);
    // a → c in one step is impossible, and so is a → c → … in 1 step: the pair a → c one step inside a 1-gap does not exist.
    expect(addBridgeExpectations(flat([[1, 0], [0, 1]]), 2, [[0, 1, 2, 1]], new Float64Array(4))).toBe(-Infinity);
  });
});

describe('maximum likelihood with gaps, by EM', () => {
  it('is exactly the closed form when every pair is one step apart (the fast path: no iteration)', () => {
    fc.assert(fc.property(fc.array(fc.integer({ min: 0, max: 30 }), { minLength: 16, maxLength: 16 }), (raw) => {
      const counts = Float64Array.from(raw);
      const alpha = new Float64Array(16).fill(0.5);
      const em = gapMaximumLikelihood(counts, [], alpha, 4);
      const closed = maximumLikelihood(counts, alpha, 4);
      expect(Array.from(em.p)).toEqual(Array.from(closed.p));
      expect(em.rowsFromPrior).toEqual(closed.rowsFromPrior);
      expect(em.rowsNeverLeft).toEqual(closed.rowsNeverLeft);
      expect(em.iterations).toBe(0);
    }), { numRuns: 50 });
  });

  // The case built for test/reference/gap-mle.py: one-step counts and pairs 2–4 steps apart, c → a impossible.
  const counts = Float64Array.from([20, 5, 2, 3, 15, 6, 0, 4, 18]);
  const gaps: GapCell[] = [[0, 1, 2, 6], [0, 2, 2, 4], [1, 0, 2, 3], [2, 2, 2, 9], [0, 0, 3, 5], [2, 1, 3, 2], [1, 2, 4, 3]];
  const alpha = Float64Array.from([0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0, 0.5, 0.5]);

  it('agrees with direct maximisation of the gap likelihood by scipy (test/reference/gap-mle.py)', () => {
    // scipy 1.17.1 / numpy 2.4.6, BFGS then Nelder–Mead on row-wise softmax logits from 20 starts
    // (test/reference/gap-mle.py, run once; values pasted as printed).
    const scipyP = [0.67574482691, 0.228393161662, 0.0958620114285, 0.184792360018, 0.563978094707, 0.251229545275, 0, 0.134012094953, 0.865987905047];
    const scipyLogLikelihood = -82.601385347375;
    const em = gapMaximumLikelihood(counts, gaps, alpha, 3);
    expect(em.converged).toBe(true);
    Array.from(em.p).forEach((x, c) => expect(x).toBeCloseTo(scipyP[c]!, 6));
    expect(em.logLikelihood).toBeCloseTo(scipyLogLikelihood, 8);
    expect(em.p[6]).toBe(0);
    // The likelihood at EM's answer matches brute force over latent paths, not only EM's own sum.
    const rows = [0, 1, 2].map((i) => Array.from(em.p.slice(i * 3, i * 3 + 3)));
    let oneStep = 0;
    counts.forEach((n, c) => { if (n > 0) oneStep += n * Math.log(em.p[c]!); });
    expect(em.logLikelihood).toBeCloseTo(oneStep + bruteForce(rows, gaps).logLikelihood, 10);
  });

  it('never lowers the likelihood from one iteration to the next (Dempster, Laird & Rubin 1977)', () => {
    let p: Float64Array = Float64Array.from([1 / 3, 1 / 3, 1 / 3, 1 / 3, 1 / 3, 1 / 3, 0, 0.5, 0.5]);
    let last = -Infinity;
    for (let n = 0; n < 30; n++) {
      const step = gapMaximumLikelihood(counts, gaps, alpha, 3, p, 1);
      expect(step.logLikelihood).toBeGreaterThanOrEqual(last - 1e-9);
      last = step.logLikelihood;
      p = step.p;
    }
  });

  it('recovers the one-step matrix from simulated surveys with missed visits (20,000 sites)', () => {
    // A chain simulated with 40% of visits missed (seeded). The estimate from all pairs is within 6
    // completed-data standard errors of the truth in every cell: the binomial standard error with the
    // completed row total understates the real one (the missing information, Dempster, Laird & Rubin
    // 1977), hence the wide margin; the seed is fixed, so the test is deterministic.
    const truth = [[0.7, 0.2, 0.1], [0.1, 0.6, 0.3], [0.05, 0.15, 0.8]];
    const random = randomStreams(7).stream('gap-em-test');
    const uniform = (): number => random.uniform();
    const next = (s: number): number => { const u = uniform(); let acc = 0; for (let j = 0; j < 3; j++) { acc += truth[s]![j]!; if (u < acc) return j; } return 2; };
    const one = new Float64Array(9);
    const byGap = new Map<string, number>();
    for (let site = 0; site < 20000; site++) {
      let s = Math.floor(uniform() * 3);
      let lastSeen = s;
      let gap = 0;
      for (let t = 1; t <= 6; t++) {
        s = next(s);
        gap += 1;
        if (uniform() < 0.4 && t < 6) continue;
        if (gap === 1) one[lastSeen * 3 + s] += 1;
        else byGap.set(`${lastSeen},${s},${gap}`, (byGap.get(`${lastSeen},${s},${gap}`) ?? 0) + 1);
        lastSeen = s;
        gap = 0;
      }
    }
    const cells = [...byGap].map(([key, n]) => { const [i, j, g] = key.split(',').map(Number); return [i!, j!, g!, n] as GapCell; })
      .sort((a, b) => a[2] - b[2] || a[0] - b[0] || a[1] - b[1]);
    const em = gapMaximumLikelihood(one, cells, new Float64Array(9).fill(0.5), 3);
    expect(em.converged).toBe(true);
    for (let i = 0; i < 3; i++) {
      const n = em.expected.slice(i * 3, i * 3 + 3).reduce((a, b) => a + b, 0);
      for (let j = 0; j < 3; j++) {
        const se = Math.sqrt(truth[i]![j]! * (1 - truth[i]![j]!) / n);
        expect(Math.abs(em.p[i * 3 + j]! - truth[i]![j]!)).toBeLessThan(6 * se);
      }
    }
  });
});
