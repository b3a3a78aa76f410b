import { describe, expect, it } from 'vitest';
import { errorLogLikelihood, errorMaximumLikelihood } from '../../src/chain/error-em.js';
import { recordPatterns, type RecordPatterns } from '../../src/chain/record-patterns.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';

/**
 * One error matrix per observer: records are (site, time, recorded state, matrix) — matrix 0 the
 * pooled one, 1 + o observer o's (fit/error-model.ts). Observers are named by their matrix here,
 * so matrixOfObserver is the identity on the names' order of first appearance.
 */
type Row = [string, number, number, number];

function patternsOf(k: number, rows: Row[]): RecordPatterns {
  const states = Array.from({ length: k }, (_, i) => String.fromCharCode(97 + i));
  const table = tableFromRecords('t.csv', states, rows.map(([site, time, state, m], n) => ({ site, time, state, observer: `m${m}`, line: n + 2 })));
  return recordPatterns(table.rows, 1, Int32Array.from(table.observers!, (name) => Number(name.slice(1))));
}

/** Every hidden path enumerated, each survey emitting through its own matrix: log-likelihood and the EM step's expected counts. */
function bruteForce(rows: Row[], k: number, matrices: number, pi: number[], p: number[], e: number[]) {
  const bySite = new Map<string, [number, number, number][]>();
  for (const [site, time, state, m] of rows) bySite.set(site, [...(bySite.get(site) ?? []), [time, state, m]]);
  let logLikelihood = 0;
  const transitions = new Float64Array(k * k);
  const recorded = new Float64Array(matrices * k * k);
  const first = new Float64Array(k);
  for (const surveys of bySite.values()) {
    const t0 = surveys[0]![0];
    const T = surveys[surveys.length - 1]![0] - t0 + 1;
    let total = 0;
    const tr = new Float64Array(k * k);
    const rec = new Float64Array(matrices * k * k);
    const fi = new Float64Array(k);
    const walk = (path: number[]): void => {
      if (path.length === T) {
        let w = pi[path[0]!]!;
        for (let t = 1; t < T; t++) w *= p[path[t - 1]! * k + path[t]!]!;
        for (const [time, r, m] of surveys) w *= e[m * k * k + path[time - t0]! * k + r]!;
        total += w;
        for (let t = 1; t < T; t++) tr[path[t - 1]! * k + path[t]!] += w;
        for (const [time, r, m] of surveys) rec[m * k * k + path[time - t0]! * k + r] += w;
        fi[path[0]!] += w;
        return;
      }
      for (let s = 0; s < k; s++) walk([...path, s]);
    };
    walk([]);
    logLikelihood += Math.log(total);
    for (let c = 0; c < k * k; c++) transitions[c] += tr[c]! / total;
    for (let c = 0; c < matrices * k * k; c++) recorded[c] += rec[c]! / total;
    for (let x = 0; x < k; x++) first[x] += fi[x]! / total;
  }
  return { logLikelihood, transitions, recorded, first };
}

const K = 3;
// Invented records: two observers (matrices 1 and 2) and a survey by an unassessed one (matrix 0);
// sites A and D have the same states at the same steps but different observers at step 3, so they
// are two patterns; E repeats A's record exactly and joins its pattern.
const ROWS: Row[] = [
  ['A', 0, 0, 1], ['A', 1, 1, 2], ['A', 3, 1, 1], ['A', 4, 2, 2],
  ['B', 2, 2, 2], ['B', 4, 0, 0],
  ['C', 5, 1, 1],
  ['D', 0, 0, 1], ['D', 1, 1, 2], ['D', 3, 1, 2], ['D', 4, 2, 2],
  ['E', 0, 0, 1], ['E', 1, 1, 2], ['E', 3, 1, 1], ['E', 4, 2, 2],
];
const PI = [0.5, 0.3, 0.2];
const P = [0.7, 0.2, 0.1, 0.1, 0.6, 0.3, 0.05, 0.15, 0.8];
// Pooled, then a careful observer, then a careless one; cell (c, a) impossible in all three.
const E = [
  0.85, 0.12, 0.03, 0.1, 0.85, 0.05, 0.0, 0.2, 0.8,
  0.95, 0.04, 0.01, 0.04, 0.94, 0.02, 0.0, 0.05, 0.95,
  0.7, 0.25, 0.05, 0.2, 0.7, 0.1, 0.0, 0.35, 0.65,
];
// Observer counts, and the pooled matrix's: their sum (error-model.ts stackedAssessment).
const A1 = [30, 1, 1, 2, 25, 1, 0, 1, 20];
const A2 = [14, 5, 1, 4, 12, 2, 0, 6, 9];
const A = Float64Array.from([...A1.map((n, c) => n + A2[c]!), ...A1, ...A2]);

describe('record patterns with observers', () => {
  it('key on the state and the observer\'s matrix at each step', () => {
    const r = patternsOf(K, ROWS);
    expect(r.count).toBe(4);
    expect(Array.from(r.sites)).toEqual([2, 1, 1, 1]);
    expect(Array.from(r.matrix)).toEqual([1, 2, 1, 2, 2, 0, 1, 1, 2, 2, 2]);
  });
});

describe('EM with one error matrix per observer', () => {
  it('has the log-likelihood of brute-force enumeration of every hidden path, plus every matrix\'s assessment term', () => {
    const records = patternsOf(K, ROWS);
    const brute = bruteForce(ROWS, K, 3, PI, P, E);
    let assessment = 0;
    for (let c = 0; c < A.length; c++) if (A[c]! > 0) assessment += A[c]! * Math.log(E[c]!);
    expect(errorLogLikelihood(records, A, Float64Array.from(PI), Float64Array.from(P), Float64Array.from(E), K))
      .toBeCloseTo(brute.logLikelihood + assessment, 10);
  });

  it('takes one EM step to the normalised brute-force expected counts, each matrix from its own surveys and counts', () => {
    const records = patternsOf(K, ROWS);
    const alpha = new Float64Array(K * K).fill(0.5);
    // E0: each matrix's assessed proportions; π0 uniform.
    const e0 = Array.from(A, (n, c) => {
      const row = Math.floor(c / K) * K;
      let sum = 0;
      for (let j = 0; j < K; j++) sum += A[row + j]!;
      return n / sum;
    });
    const brute = bruteForce(ROWS, K, 3, [1 / 3, 1 / 3, 1 / 3], P, e0);
    const step = errorMaximumLikelihood(records, A, alpha, K, Float64Array.from(P), 1);
    expect(step.emission.length).toBe(3 * K * K);
    for (let i = 0; i < K; i++) {
      const total = brute.transitions.subarray(i * K, (i + 1) * K).reduce((a, b) => a + b, 0);
      for (let j = 0; j < K; j++) expect(step.p[i * K + j]).toBeCloseTo(brute.transitions[i * K + j]! / total, 12);
    }
    for (let row = 0; row < 3 * K; row++) {
      const counts = Array.from({ length: K }, (_, r) => A[row * K + r]! + brute.recorded[row * K + r]!);
      const sum = counts.reduce((a, b) => a + b, 0);
      for (let r = 0; r < K; r++) expect(step.emission[row * K + r], `row ${row}`).toBeCloseTo(counts[r]! / sum, 12);
    }
  });

  it('is the one-matrix EM when every survey is read through matrix 0', () => {
    const rows: Row[] = ROWS.map(([s, t, r]) => [s, t, r, 0]);
    const one = errorMaximumLikelihood(patternsOf(K, rows), A.subarray(0, K * K), new Float64Array(K * K).fill(0.5), K, Float64Array.from(P), 30);
    const states = ['a', 'b', 'c'];
    const plain = recordPatterns(tableFromRecords('t.csv', states, rows.map(([site, time, state], n) => ({ site, time, state, line: n + 2 }))).rows, 1);
    const two = errorMaximumLikelihood(plain, A.subarray(0, K * K), new Float64Array(K * K).fill(0.5), K, Float64Array.from(P), 30);
    expect(Array.from(one.p)).toEqual(Array.from(two.p));
    expect(Array.from(one.emission)).toEqual(Array.from(two.emission));
  });
});

describe('EM with one error matrix per observer against an independent optimiser', () => {
  // The case of test/reference/observer-mle.py: (n sites, surveys as [step, recorded, matrix]),
  // matrix 0 pooled (observer None there), 1 and 2 the observers (0 and 1 there).
  const PATTERNS: [number, [number, number, number][]][] = [
    [30, [[0, 0, 1], [1, 0, 2], [2, 1, 1], [3, 1, 2]]],
    [25, [[0, 1, 2], [1, 1, 2], [3, 2, 1]]],
    [20, [[0, 2, 1], [1, 2, 1], [2, 2, 2]]],
    [15, [[0, 0, 2], [2, 2, 2], [3, 2, 2]]],
    [12, [[0, 1, 1], [1, 0, 2], [2, 0, 1]]],
    [10, [[0, 2, 0], [1, 1, 1], [2, 1, 0], [4, 0, 2]]],
    [8, [[0, 0, 1], [1, 1, 1], [2, 0, 1]]],
    [6, [[0, 2, 2], [2, 0, 1]]],
    [5, [[0, 1, 0]]],
  ];
  const rows: Row[] = [];
  PATTERNS.forEach(([n, surveys], q) => {
    for (let s = 0; s < n; s++) for (const [t, r, m] of surveys) rows.push([`p${q}-${String(s).padStart(2, '0')}`, t, r, m]);
  });
  const a0 = [200, 5, 5, 10, 180, 10, 0, 10, 150];
  const a1 = [150, 40, 5, 30, 120, 10, 0, 40, 100];
  const assessment = Float64Array.from([...a0.map((n, c) => n + a1[c]!), ...a0, ...a1]);

  it('agrees with direct maximisation of the likelihood by scipy (test/reference/observer-mle.py)', () => {
    const records = patternsOf(K, rows);
    expect(records.count).toBe(PATTERNS.length);
    const fit = errorMaximumLikelihood(records, assessment, new Float64Array(K * K).fill(0.5), K, new Float64Array(K * K).fill(1 / K));
    expect(fit.converged).toBe(true);
    // python3 test/reference/observer-mle.py (scipy 1.17.1, BFGS then Nelder-Mead, best of 8
    // starts), run once on 2026-12-02; values pasted as printed.
    const scipy = {
      p: [[0.391763222, 0.582102251, 0.0261345273], [0.237342805, 0.494882028, 0.267775167], [0.0290041146, 0.0846642475, 0.886331638]],
      e0: [[0.956650749, 0.0241365003, 0.0192127509], [0.0505430938, 0.906672295, 0.0427846116], [0.0, 0.0489125631, 0.951087437]],
      e1: [[0.782667281, 0.193071699, 0.0242610197], [0.20505939, 0.741715141, 0.0532254681], [0.0, 0.278867163, 0.721132837]],
      pooled: [[0.856701206, 0.11384092, 0.0294578749], [0.106800451, 0.833846365, 0.0593531844], [0.0, 0.166783936, 0.833216064]],
      pi: [0.445264951, 0.284621416, 0.270113633],
      loglik: -1396.6624958299,
    };
    scipy.p.flat().forEach((x, c) => expect(fit.p[c], `P ${c}`).toBeCloseTo(x, 4));
    [scipy.pooled, scipy.e0, scipy.e1].forEach((e, m) => e.flat().forEach((x, c) => expect(fit.emission[m * K * K + c], `E${m} ${c}`).toBeCloseTo(x, 4)));
    scipy.pi.forEach((x, c) => expect(fit.initial[c], `π ${c}`).toBeCloseTo(x, 4));
    expect(fit.logLikelihood).toBeGreaterThanOrEqual(scipy.loglik - 1e-6);
    expect(fit.logLikelihood).toBeCloseTo(scipy.loglik, 5);
    const stacked = Float64Array.from([...scipy.pooled.flat(), ...scipy.e0.flat(), ...scipy.e1.flat()]);
    expect(errorLogLikelihood(records, assessment, Float64Array.from(scipy.pi), Float64Array.from(scipy.p.flat()), stacked, K)).toBeCloseTo(scipy.loglik, 5);
  });
});
