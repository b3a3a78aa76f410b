import { describe, expect, it } from 'vitest';
import { patternEmissions, patternLength, type RecordPatterns } from '../../src/chain/record-patterns.js';
import { drawCategorical } from '../../src/uncertainty/categorical.js';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import { forwardFilter, pathScratch, samplePathsTogether, type CompletedRecords } from '../../src/uncertainty/error-sampler.js';
import { multinomialSampler } from '../../src/uncertainty/multinomial.js';
import { sampleOnePath } from '../../src/uncertainty/one-path.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import { fillSweepTables, sweepTables } from '../../src/uncertainty/sweep-tables.js';

const K = 5;

/** Rows drawn from Dirichlet(1, …), with the cells in `zeros` (row·K + column) set to 0 and the row renormalised. */
function randomRows(random: RandomStream, rows: number, zeros: readonly number[]): Float64Array {
  const out = new Float64Array(rows * K);
  for (let i = 0; i < rows; i++) sampleDirichlet(random, new Float64Array(K).fill(1), 0, K, out, i * K);
  for (const z of zeros) out[z] = 0;
  for (let i = 0; i < rows; i++) {
    const total = out.subarray(i * K, (i + 1) * K).reduce((a, b) => a + b, 0);
    for (let j = 0; j < K; j++) out[i * K + j] /= total;
  }
  return out;
}

/** Invented one-site records: 4 patterns with missed steps, two error matrices, carried 0, 2 steps or not at all (−1). */
const records: RecordPatterns = {
  count: 4,
  sites: Float64Array.from([1, 1, 1, 1]),
  start: Int32Array.from([0, 3, 7, 8, 12]),
  at: Int32Array.from([0, 2, 5, 0, 1, 2, 3, 0, 0, 3, 4, 9]),
  state: Uint8Array.from([0, 1, 1, 4, 4, 3, 2, 2, 1, 0, 0, 3]),
  matrix: Uint16Array.from([0, 1, 0, 1, 1, 0, 0, 0, 1, 0, 1, 0]),
  line: new Float64Array(12),
  extend: Int32Array.from([2, -1, 0, 3]),
};

function completed(): CompletedRecords {
  return { transitions: new Float64Array(K * K), recorded: new Float64Array(2 * K * K), first: new Float64Array(K), latest: new Float64Array(K) };
}

describe('one-site paths of the error sampler (one-path.ts, categorical.ts)', () => {
  it('drawCategorical places the trial where Multinomial(1, ·) does, taking the same uniforms (5,000 rows, some with zeros)', () => {
    const make = randomStreams(5);
    const a = randomStreams(6);
    const b = randomStreams(6);
    const multinomial = multinomialSampler(b);
    const counts = new Int32Array(K);
    const seen = new Int32Array(K);
    for (let n = 0; n < 5000; n++) {
      const w = randomRows(make, 1, n % 3 === 0 ? [n % K, (n + 2) % K] : n % 3 === 1 ? [K - 1] : []);
      let last = 0;
      for (let j = 0; j < K; j++) if (w[j]! > 0) last = j;
      counts.fill(0);
      multinomial(1, w, 0, last + 1, counts, 0);
      const x = drawCategorical(a.uniform, w, 0, last + 1);
      expect(counts[x]).toBe(1);
      seen[x] += 1;
    }
    // Still in step after 5,000 draws, and every state was drawn.
    expect(a.uniform()).toBe(b.uniform());
    for (let j = 0; j < K; j++) expect(seen[j]).toBeGreaterThan(0);
  });

  it('the forward filter, skipping E\'s structural zeros, equals the full product (α̂_{t−1}P) ⊙ e_t scaled, bit for bit', () => {
    const random = randomStreams(11);
    const p = randomRows(random, K, [3, 9, 15]);
    const e = randomRows(random, 2 * K, [1, 2, 8, 12, 20, 33, 44]);
    const pi = randomRows(random, 1, []);
    const tables = sweepTables(K, 2);
    fillSweepTables(tables, p, e);
    let zeros = 0;
    for (let q = 0; q < records.count; q++) {
      const T = patternLength(records, q);
      const scratch = pathScratch(K);
      scratch.filter = new Float64Array(T * K);
      scratch.support = new Int32Array(T * K);
      scratch.supportCount = new Int32Array(T);
      forwardFilter(records, q, T, pi, tables, scratch);
      const filter = scratch.filter;
      const emit = patternEmissions(records, q, e, K, new Float64Array(T * K));
      const expected = new Float64Array(T * K);
      for (let t = 0; t < T; t++) {
        let total = 0;
        for (let x = 0; x < K; x++) {
          let v = 0;
          if (t === 0) v = pi[x]!;
          else for (let a = 0; a < K; a++) v += expected[(t - 1) * K + a]! * p[a * K + x]!;
          if (t === 0 || records.at.subarray(records.start[q]!, records.start[q + 1]!).includes(t)) v *= emit[t * K + x]!;
          expected[t * K + x] = v;
          total += v;
        }
        for (let x = 0; x < K; x++) expected[t * K + x] /= total;
      }
      expect(filter).toEqual(expected);
      // Each row's support: the states where it is positive, ascending.
      for (let t = 0; t < T; t++) {
        const positive = [...filter.subarray(t * K, (t + 1) * K)].flatMap((v, x) => (v > 0 ? [x] : []));
        expect([...scratch.support.subarray(t * K, t * K + scratch.supportCount[t]!)]).toEqual(positive);
      }
      zeros += filter.filter((v) => v === 0).length;
    }
    // The skip was taken: some surveys were recorded as a state that some true states never give.
    expect(zeros).toBeGreaterThan(0);
  });

  it('one site drawn as one state gives the counts the multinomial path gives for n = 1, and leaves the stream where it does (200 sweeps)', () => {
    const random = randomStreams(12);
    const p = randomRows(random, K, [3, 9, 15]);
    const e = randomRows(random, 2 * K, [1, 2, 8, 12, 20, 33, 44]);
    const pi = randomRows(random, 1, []);
    const one = randomStreams(13).stream('chain:0');
    const together = randomStreams(13).stream('chain:0');
    const multinomial = multinomialSampler(together);
    const scratch = pathScratch(K);
    const tables = sweepTables(K, 2);
    fillSweepTables(tables, p, e);
    const byOne = completed();
    const byMultinomial = completed();
    for (let sweep = 0; sweep < 200; sweep++) {
      for (let q = 0; q < records.count; q++) {
        const T = patternLength(records, q);
        scratch.filter = new Float64Array(T * K);
        scratch.support = new Int32Array(T * K);
        scratch.supportCount = new Int32Array(T);
        forwardFilter(records, q, T, pi, tables, scratch);
        sampleOnePath(records, q, T, tables, one.uniform, scratch, byOne);
        samplePathsTogether(records, q, T, p, K, multinomial, scratch, byMultinomial);
      }
    }
    expect(byOne).toEqual(byMultinomial);
    expect(one.uniform()).toBe(together.uniform());
    // Every path counted: 4 first states and 3 carried sites a sweep; 12 surveys; steps (5 + 2) + 3 + 0 + (9 + 3) = 22.
    expect(byOne.first.reduce((a, b) => a + b, 0)).toBe(800);
    expect(byOne.latest.reduce((a, b) => a + b, 0)).toBe(600);
    expect(byOne.recorded.reduce((a, b) => a + b, 0)).toBe(2400);
    expect(byOne.transitions.reduce((a, b) => a + b, 0)).toBe(200 * 22);
  });
});
