import { describe, expect, it } from 'vitest';
import { patternLength, type RecordPatterns } from '../../src/chain/record-patterns.js';
import { recordPrefixes } from '../../src/chain/record-prefixes.js';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import { pathScratch, samplePatternPaths, type CompletedRecords } from '../../src/uncertainty/error-sampler.js';
import { multinomialSampler } from '../../src/uncertainty/multinomial.js';
import { pathKernel } from '../../src/uncertainty/path-kernel.js';
import { generatorOfKey, keyOf, randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import { fillSweepTables, sweepTables } from '../../src/uncertainty/sweep-tables.js';

const K = 4;
const M = 2;

/** Invented records: 400 patterns of 1–3 sites, 1–7 steps, surveys at random steps through two matrices, carried −1 … 2 steps. */
function inventedRecords(random: RandomStream): RecordPatterns {
  const sites: number[] = [];
  const start = [0];
  const at: number[] = [];
  const state: number[] = [];
  const matrix: number[] = [];
  const extend: number[] = [];
  for (let q = 0; q < 400; q++) {
    sites.push(random.uniform() < 0.8 ? 1 : 2 + random.integer(2));
    const T = 1 + random.integer(7);
    for (let t = 0; t < T; t++) {
      if (t > 0 && t < T - 1 && random.uniform() < 0.3) continue;
      at.push(t);
      // Few recorded states, so that many patterns share their first steps.
      state.push(random.integer(3));
      matrix.push(random.uniform() < 0.8 ? 0 : 1);
    }
    start.push(at.length);
    extend.push(random.integer(4) - 1);
  }
  return {
    count: sites.length, sites: Float64Array.from(sites), start: Int32Array.from(start), at: Int32Array.from(at),
    state: Uint8Array.from(state), matrix: Uint16Array.from(matrix), line: new Float64Array(at.length), extend: Int32Array.from(extend),
  };
}

/** Rows from Dirichlet(1, …) with the cells in `zeros` set to 0 and renormalised. */
function rows(random: RandomStream, n: number, zeros: readonly number[], out: Float64Array): void {
  for (let i = 0; i < n; i++) sampleDirichlet(random, new Float64Array(K).fill(1), 0, K, out, i * K);
  for (const z of zeros) out[z] = 0;
  for (let i = 0; i < n; i++) {
    const total = out.subarray(i * K, (i + 1) * K).reduce((a, b) => a + b, 0);
    for (let j = 0; j < K; j++) out[i * K + j] /= total;
  }
}

function completed(): CompletedRecords {
  return { transitions: new Float64Array(K * K), recorded: new Float64Array(M * K * K), first: new Float64Array(K), latest: new Float64Array(K) };
}

describe('the WebAssembly path kernel (path-kernel.ts, assembly/path-kernel.ts)', () => {
  const records = inventedRecords(randomStreams(21));

  it('record prefixes: a pattern\'s steps are a chain of prefixes, each once however many patterns share it', () => {
    const prefixes = recordPrefixes(records, K);
    let steps = 0;
    const seen = new Map<string, number>();
    for (let q = 0; q < records.count; q++) {
      const T = patternLength(records, q);
      steps += T;
      let key = '';
      let s = records.start[q]!;
      for (let t = 0; t < T; t++) {
        const node = prefixes.nodeOf[prefixes.nodeStart[q]! + t]!;
        expect(prefixes.parent[node]).toBe(t === 0 ? -1 : prefixes.nodeOf[prefixes.nodeStart[q]! + t - 1]);
        const surveyed = s < records.start[q + 1]! && records.at[s] === t;
        expect(prefixes.column[node]).toBe(surveyed ? records.matrix[s]! * K + records.state[s]! : -1);
        key += surveyed ? `${records.matrix[s]}:${records.state[s]},` : '-,';
        if (surveyed) s += 1;
        // The same prefix, the same node; a new prefix, a new node.
        expect(seen.get(key) ?? node).toBe(node);
        seen.set(key, node);
      }
    }
    expect(prefixes.count).toBe(seen.size);
    // Shared: fewer prefixes than steps.
    expect(prefixes.count).toBeLessThan(steps * 0.8);
  });

  it('draws every sweep\'s paths as samplePatternPaths does pattern by pattern, and leaves the stream where it does (300 sweeps)', () => {
    const make = randomStreams(22);
    const key = keyOf(randomStreams(23).stream('chain:1'));
    const kernel = pathKernel(K, M, records, key);
    const js = generatorOfKey(key);
    const jsMultinomial = multinomialSampler(js);
    const kernelMultinomial = multinomialSampler(kernel.random);
    const tables = sweepTables(K, M);
    const scratch = pathScratch(K);
    const kernelScratch = pathScratch(K);
    const p = new Float64Array(K * K);
    const e = new Float64Array(M * K * K);
    const pi = new Float64Array(K);
    let several = 0;
    for (let sweep = 0; sweep < 300; sweep++) {
      // Structural zeros in P (off the diagonal) and E (never in the first column: state 3 is never recorded).
      rows(make, K, sweep % 2 === 0 ? [1, 6, 11] : [], p);
      rows(make, M * K, [2, 7, 13, 24, 30], e);
      rows(make, 1, [], pi);
      fillSweepTables(tables, p, e);
      fillSweepTables(kernel.tables, p, e);
      kernel.pi.set(pi);
      const done = completed();
      for (let q = 0; q < records.count; q++) samplePatternPaths(records, q, pi, tables, jsMultinomial, js.uniform, scratch, done);
      kernel.sweep(kernelMultinomial, kernelScratch);
      expect(kernel.done.transitions).toEqual(done.transitions);
      expect(kernel.done.recorded).toEqual(done.recorded);
      expect(kernel.done.first).toEqual(done.first);
      expect(kernel.done.latest).toEqual(done.latest);
      // Between sweeps the chain draws gamma variates from the same stream (its Dirichlets).
      expect(kernel.random.gamma(0.7)).toBe(js.gamma(0.7));
      several += records.sites.filter((n) => n > 1).length;
    }
    expect(kernel.random.uniform()).toBe(js.uniform());
    expect(several).toBeGreaterThan(0);
    // Every site counted at its first state each sweep.
    let sites = 0;
    for (let q = 0; q < records.count; q++) sites += records.sites[q]!;
    expect(kernel.done.first.reduce((a, b) => a + b, 0)).toBe(sites);
  });

  it('a kernel laid out after another refuses the first', () => {
    const first = pathKernel(K, M, records, keyOf(randomStreams(1)));
    pathKernel(K, M, records, keyOf(randomStreams(2)));
    expect(() => first.sweep(multinomialSampler(first.random), pathScratch(K))).toThrow(/another took its memory/);
  });
});
