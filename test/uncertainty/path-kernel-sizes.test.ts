import { describe, expect, it } from 'vitest';
import type { RecordPatterns } from '../../src/chain/record-patterns.js';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import { pathScratch, samplePatternPaths, type CompletedRecords } from '../../src/uncertainty/error-sampler.js';
import { multinomialSampler, type Multinomial } from '../../src/uncertainty/multinomial.js';
import { pathKernel } from '../../src/uncertainty/path-kernel.js';
import { generatorOfKey, keyOf, randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import { fillSweepTables, sweepTables } from '../../src/uncertainty/sweep-tables.js';

const M = 2;

/**
 * The kernel's forward filter takes the states eight, two and one at a time (assembly/path-kernel.ts
 * predict): k = 3, 5 and 9 reach every one of those loops and the odd tails, which the k = 4 test
 * (path-kernel.test.ts) does not.
 */
function inventedRecords(random: RandomStream, k: number): RecordPatterns {
  const sites: number[] = [];
  const start = [0];
  const at: number[] = [];
  const state: number[] = [];
  const matrix: number[] = [];
  const extend: number[] = [];
  for (let q = 0; q < 200; q++) {
    sites.push(random.uniform() < 0.5 ? 1 : 2 + random.integer(2));
    const T = 1 + random.integer(9);
    for (let t = 0; t < T; t++) {
      if (t > 0 && t < T - 1 && random.uniform() < 0.3) continue;
      at.push(t);
      // State k − 1 is never recorded (its column of E is all structural zeros).
      state.push(random.integer(k - 1));
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

/** n rows of k from Dirichlet(1, …), the cells in `zero` set to 0, renormalised. */
function rows(random: RandomStream, n: number, k: number, zero: (cell: number) => boolean, out: Float64Array): void {
  for (let i = 0; i < n; i++) sampleDirichlet(random, new Float64Array(k).fill(1), 0, k, out, i * k);
  for (let c = 0; c < n * k; c++) if (zero(c)) out[c] = 0;
  for (let i = 0; i < n; i++) {
    const total = out.subarray(i * k, (i + 1) * k).reduce((a, b) => a + b, 0);
    for (let j = 0; j < k; j++) out[i * k + j] /= total;
  }
}

/** A multinomial that also keeps, bit for bit, every probability vector it is given. */
function recording(inner: Multinomial, seen: number[]): Multinomial {
  return (n, p, offset, count, out, outOffset) => {
    for (let i = 0; i < count; i++) seen.push(p[offset + i]!);
    inner(n, p, offset, count, out, outOffset);
  };
}

describe('the WebAssembly path kernel at odd and larger k (assembly/path-kernel.ts predict)', () => {
  for (const k of [3, 5, 9]) {
    it(`k = ${k}: every sweep's paths, and the filtered laws behind the patterns of several sites, as the JavaScript sampler's (20 sweeps)`, () => {
      const records = inventedRecords(randomStreams(30 + k), k);
      const make = randomStreams(40 + k);
      const key = keyOf(randomStreams(50 + k).stream('chain:1'));
      const kernel = pathKernel(k, M, records, key);
      const js = generatorOfKey(key);
      const jsSeen: number[] = [];
      const kernelSeen: number[] = [];
      const jsMultinomial = recording(multinomialSampler(js), jsSeen);
      const kernelMultinomial = recording(multinomialSampler(kernel.random), kernelSeen);
      const tables = sweepTables(k, M);
      const scratch = pathScratch(k);
      const kernelScratch = pathScratch(k);
      const p = new Float64Array(k * k);
      const e = new Float64Array(M * k * k);
      const pi = new Float64Array(k);
      for (let sweep = 0; sweep < 20; sweep++) {
        // Structural zeros: P two steps off the diagonal on even sweeps; E beyond its neighbours, and the
        // column of state k − 1 (never recorded).
        rows(make, k, k, (c) => sweep % 2 === 0 && Math.abs(Math.floor(c / k) - (c % k)) === 2, p);
        rows(make, M * k, k, (c) => Math.abs((Math.floor(c / k) % k) - (c % k)) > 1 || c % k === k - 1, e);
        rows(make, 1, k, () => false, pi);
        fillSweepTables(tables, p, e);
        fillSweepTables(kernel.tables, p, e);
        kernel.pi.set(pi);
        const done: CompletedRecords = { transitions: new Float64Array(k * k), recorded: new Float64Array(M * k * k), first: new Float64Array(k), latest: new Float64Array(k) };
        for (let q = 0; q < records.count; q++) samplePatternPaths(records, q, pi, tables, jsMultinomial, js.uniform, scratch, done);
        kernel.sweep(kernelMultinomial, kernelScratch);
        expect(kernel.done.transitions).toEqual(done.transitions);
        expect(kernel.done.recorded).toEqual(done.recorded);
        expect(kernel.done.first).toEqual(done.first);
        expect(kernel.done.latest).toEqual(done.latest);
        expect(kernel.random.gamma(0.7)).toBe(js.gamma(0.7));
      }
      expect(kernel.random.uniform()).toBe(js.uniform());
      // The laws the patterns of several sites were drawn from (each one's last filtered law, then
      // α̂_{t−1}(a)·P[a, b] normalised at every step): the same numbers, bit for bit.
      expect(kernelSeen.length).toBeGreaterThan(2_000);
      expect(new Float64Array(kernelSeen)).toEqual(new Float64Array(jsSeen));
    });
  }
});
