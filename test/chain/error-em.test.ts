import { describe, expect, it } from 'vitest';
import { errorLogLikelihood, errorMaximumLikelihood } from '../../src/chain/error-em.js';
import { recordPatterns, type RecordPatterns } from '../../src/chain/record-patterns.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { simulateWithErrors } from '../error-helpers.js';

/** A pattern table from [site, time, recorded state] triples, step 1. */
function patternsOf(k: number, rows: [string, number, number][]): RecordPatterns {
  const states = Array.from({ length: k }, (_, i) => String.fromCharCode(97 + i));
  const table = tableFromRecords('t.csv', states, rows.map(([site, time, state], n) => ({ site, time, state, line: n + 2 })));
  return recordPatterns(table.rows, 1);
}

/**
 * Every hidden path of every site enumerated: the records' log-likelihood and the EM step's
 * expected counts (transitions, true→recorded, first states) — the definitions, no recursion.
 */
function bruteForce(rows: [string, number, number][], k: number, pi: number[], p: number[], e: number[]) {
  const bySite = new Map<string, [number, number][]>();
  for (const [site, time, state] of rows) bySite.set(site, [...(bySite.get(site) ?? []), [time, state]]);
  let logLikelihood = 0;
  const transitions = new Float64Array(k * k);
  const recorded = new Float64Array(k * k);
  const first = new Float64Array(k);
  for (const surveys of bySite.values()) {
    const t0 = surveys[0]![0];
    const T = surveys[surveys.length - 1]![0] - t0 + 1;
    let total = 0;
    const tr = new Float64Array(k * k);
    const rec = new Float64Array(k * k);
    const fi = new Float64Array(k);
    const walk = (path: number[]): void => {
      if (path.length === T) {
        let w = pi[path[0]!]!;
        for (let t = 1; t < T; t++) w *= p[path[t - 1]! * k + path[t]!]!;
        for (const [time, r] of surveys) w *= e[path[time - t0]! * k + r]!;
        total += w;
        for (let t = 1; t < T; t++) tr[path[t - 1]! * k + path[t]!] += w;
        for (const [time, r] of surveys) rec[path[time - t0]! * k + r] += w;
        fi[path[0]!] += w;
        return;
      }
      for (let s = 0; s < k; s++) walk([...path, s]);
    };
    walk([]);
    logLikelihood += Math.log(total);
    for (let c = 0; c < k * k; c++) { transitions[c] += tr[c]! / total; recorded[c] += rec[c]! / total; }
    for (let x = 0; x < k; x++) first[x] += fi[x]! / total;
  }
  return { logLikelihood, transitions, recorded, first };
}

const K = 3;
// Invented records: three sites, gaps of 1–3 steps, one site seen once, one record shared by two sites.
const ROWS: [string, number, number][] = [
  ['A', 0, 0], ['A', 1, 1], ['A', 3, 1], ['A', 4, 2],
  ['B', 2, 2], ['B', 4, 0],
  ['C', 5, 1],
  ['D', 0, 0], ['D', 1, 1], ['D', 3, 1], ['D', 4, 2],
];
const PI = [0.5, 0.3, 0.2];
const P = [0.7, 0.2, 0.1, 0.1, 0.6, 0.3, 0.05, 0.15, 0.8];
const E = [0.9, 0.08, 0.02, 0.1, 0.85, 0.05, 0.0, 0.2, 0.8];
const A = Float64Array.from([40, 3, 1, 4, 30, 2, 0, 5, 25]);

describe('record patterns', () => {
  it('pool sites with the same record (same states at the same steps after their first survey, same steps to the latest time)', () => {
    const r = patternsOf(K, ROWS);
    expect(r.count).toBe(3);
    expect(Array.from(r.sites)).toEqual([2, 1, 1]);
    expect(Array.from(r.at)).toEqual([0, 1, 3, 4, 0, 2, 0]);
    expect(Array.from(r.extend)).toEqual([1, 1, 0]);
  });
});

describe('EM with observer error (Baum–Welch with the assessment as complete data on E)', () => {
  it('has the log-likelihood of brute-force enumeration of every hidden path, plus the assessment term', () => {
    const records = patternsOf(K, ROWS);
    const brute = bruteForce(ROWS, K, PI, P, E);
    let assessment = 0;
    for (let c = 0; c < K * K; c++) if (A[c]! > 0) assessment += A[c]! * Math.log(E[c]!);
    expect(errorLogLikelihood(records, A, Float64Array.from(PI), Float64Array.from(P), Float64Array.from(E), K))
      .toBeCloseTo(brute.logLikelihood + assessment, 10);
  });

  it('takes one EM step to the normalised brute-force expected counts', () => {
    const records = patternsOf(K, ROWS);
    const alpha = new Float64Array(K * K).fill(0.5);
    // One iteration from P with E0 = the assessment's proportions and π0 uniform.
    const e0 = Array.from(A, (n, c) => n / [44, 36, 30][Math.floor(c / K)]!);
    const brute = bruteForce(ROWS, K, [1 / 3, 1 / 3, 1 / 3], P, e0);
    const step = errorMaximumLikelihood(records, A, alpha, K, Float64Array.from(P), 1);
    for (let i = 0; i < K; i++) {
      const total = brute.transitions.subarray(i * K, (i + 1) * K).reduce((a, b) => a + b, 0);
      for (let j = 0; j < K; j++) expect(step.p[i * K + j]).toBeCloseTo(brute.transitions[i * K + j]! / total, 12);
      const recorded = Array.from({ length: K }, (_, r) => A[i * K + r]! + brute.recorded[i * K + r]!);
      const sum = recorded.reduce((a, b) => a + b, 0);
      for (let r = 0; r < K; r++) expect(step.emission[i * K + r]).toBeCloseTo(recorded[r]! / sum, 12);
    }
    const firsts = brute.first.reduce((a, b) => a + b, 0);
    for (let x = 0; x < K; x++) expect(step.initial[x]).toBeCloseTo(brute.first[x]! / firsts, 12);
  });

  it('never lowers the likelihood, and keeps the cells the assessment never saw at zero', () => {
    const records = patternsOf(K, ROWS);
    const alpha = new Float64Array(K * K).fill(0.5);
    let previous = -Infinity;
    for (const n of [1, 2, 5, 20, 100]) {
      const fit = errorMaximumLikelihood(records, A, alpha, K, Float64Array.from(P), n);
      expect(fit.logLikelihood).toBeGreaterThanOrEqual(previous - 1e-9);
      expect(fit.emission[2 * K]).toBe(0);
      previous = fit.logLikelihood;
    }
  });

  it('recovers the chain and the error matrix from 3,000 simulated sites (12 years, 30% of visits missed)', () => {
    const truthP = [[0.8, 0.15, 0.05], [0.1, 0.7, 0.2], [0.05, 0.1, 0.85]];
    const truthE = [[0.9, 0.1, 0], [0.08, 0.87, 0.05], [0, 0.1, 0.9]];
    const sim = simulateWithErrors(randomStreams(7).stream('sim'), truthP, truthE, [0.4, 0.3, 0.3], 3000, 12, 0.3, 200);
    const records = recordPatterns(sim.table.rows, 1);
    const alpha = new Float64Array(K * K).fill(0.5);
    const fit = errorMaximumLikelihood(records, sim.assessment, alpha, K, new Float64Array(K * K).fill(1 / K));
    expect(fit.converged).toBe(true);
    // 3,000 sites × ~8 visits: standard errors about 0.01 on P's cells; 0.03 allows 3 s.e.
    truthP.flat().forEach((x, c) => expect(Math.abs(fit.p[c]! - x), `P cell ${c}`).toBeLessThan(0.03));
    truthE.flat().forEach((x, c) => expect(Math.abs(fit.emission[c]! - x), `E cell ${c}`).toBeLessThan(0.03));
  });
});

describe('EM with observer error against an independent optimiser', () => {
  // The case of test/reference/error-mle.py: nine record patterns (n sites each; recorded states at
  // steps after the first survey) and an assessment whose cell (c, a) is 0. With the assessment a
  // tenth of this size the likelihood had two modes: EM from the assessment's proportions reached
  // −442.004, the optimiser −441.910 (E[a, a] = 0.64) — EM finds a local maximum, as it may.
  const PATTERNS: [number, [number, number][]][] = [
    [30, [[0, 0], [1, 0], [2, 1], [3, 1]]],
    [25, [[0, 1], [1, 1], [3, 2]]],
    [20, [[0, 2], [1, 2], [2, 2]]],
    [15, [[0, 0], [2, 2], [3, 2]]],
    [12, [[0, 1], [1, 0], [2, 0]]],
    [10, [[0, 2], [1, 1], [2, 1], [4, 0]]],
    [8, [[0, 0], [1, 1], [2, 0]]],
    [6, [[0, 2], [2, 0]]],
    [5, [[0, 1]]],
  ];
  const rows: [string, number, number][] = [];
  PATTERNS.forEach(([n, surveys], q) => {
    for (let s = 0; s < n; s++) for (const [t, r] of surveys) rows.push([`p${q}-${String(s).padStart(2, '0')}`, t, r]);
  });
  const assessment = Float64Array.from([400, 30, 10, 40, 300, 20, 0, 50, 250]);

  it('agrees with direct maximisation of the likelihood by scipy (test/reference/error-mle.py)', () => {
    const records = patternsOf(K, rows);
    expect(records.count).toBe(PATTERNS.length);
    const fit = errorMaximumLikelihood(records, assessment, new Float64Array(K * K).fill(0.5), K, new Float64Array(K * K).fill(1 / K));
    expect(fit.converged).toBe(true);
    // python3 test/reference/error-mle.py (scipy.optimize.minimize, BFGS then Nelder-Mead, best of
    // 8 starts), run once; values pasted as printed.
    const scipy = {
      p: [[0.46693896, 0.473390482, 0.0596705584], [0.188018668, 0.567101794, 0.244879539], [0.051392928, 0.0841215954, 0.864485477]],
      e: [[0.909060804, 0.0691690481, 0.021770148], [0.109007293, 0.840366456, 0.0506262512], [0.0, 0.142129001, 0.857870999]],
      pi: [0.420216411, 0.329295923, 0.250487665],
      loglik: -889.308506369,
    };
    scipy.p.flat().forEach((x, c) => expect(fit.p[c], `P ${c}`).toBeCloseTo(x, 4));
    scipy.e.flat().forEach((x, c) => expect(fit.emission[c], `E ${c}`).toBeCloseTo(x, 4));
    scipy.pi.forEach((x, c) => expect(fit.initial[c], `π ${c}`).toBeCloseTo(x, 4));
    expect(fit.logLikelihood).toBeCloseTo(scipy.loglik, 5);
    // EM's answer is at least as high as the optimiser's, and the likelihoods are one function:
    // sere's at scipy's parameters is scipy's printed value.
    expect(fit.logLikelihood).toBeGreaterThanOrEqual(scipy.loglik - 1e-6);
    expect(errorLogLikelihood(records, assessment, Float64Array.from(scipy.pi), Float64Array.from(scipy.p.flat()), Float64Array.from(scipy.e.flat()), K))
      .toBeCloseTo(scipy.loglik, 5);
  });
});
