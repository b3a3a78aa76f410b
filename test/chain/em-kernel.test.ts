import { describe, expect, it } from 'vitest';
import { errorEStepKernel } from '../../src/chain/em-kernel.js';
import { errorEStep, type ErrorEStep } from '../../src/chain/error-e-step.js';
import type { RecordPatterns } from '../../src/chain/record-patterns.js';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';

/**
 * Invented records: `count` patterns of 1–4 sites, 1–9 steps, surveys at random steps (about a third
 * of the inner steps unsurveyed) through `m` matrices.
 */
function inventedRecords(random: RandomStream, count: number, k: number, m: number): RecordPatterns {
  const sites: number[] = [];
  const start = [0];
  const at: number[] = [];
  const state: number[] = [];
  const matrix: number[] = [];
  for (let q = 0; q < count; q++) {
    sites.push(1 + random.integer(4));
    const T = 1 + random.integer(9);
    for (let t = 0; t < T; t++) {
      if (t > 0 && t < T - 1 && random.uniform() < 0.35) continue;
      at.push(t);
      state.push(random.integer(k));
      matrix.push(random.integer(m));
    }
    start.push(at.length);
  }
  return {
    count, sites: Float64Array.from(sites), start: Int32Array.from(start), at: Int32Array.from(at), state: Uint8Array.from(state),
    matrix: Uint16Array.from(matrix), line: new Float64Array(at.length), extend: new Int32Array(count).fill(-1),
  };
}

/** `n` rows of k from Dirichlet(1, …), the cells where `zero(row, column)` set to 0, renormalised. */
function rows(random: RandomStream, n: number, k: number, zero: (i: number, j: number) => boolean): Float64Array {
  const out = new Float64Array(n * k);
  for (let i = 0; i < n; i++) {
    sampleDirichlet(random, new Float64Array(k).fill(1), 0, k, out, i * k);
    for (let j = 0; j < k; j++) if (zero(i % k, j)) out[i * k + j] = 0;
    const total = out.subarray(i * k, (i + 1) * k).reduce((a, b) => a + b, 0);
    for (let j = 0; j < k; j++) out[i * k + j] /= total;
  }
  return out;
}

const bits = (values: ArrayLike<number>): string => Buffer.from(Float64Array.from(values).buffer).toString('hex');

function expectSameBits(kernel: ErrorEStep, reference: ErrorEStep): void {
  expect(bits(kernel.transitions)).toBe(bits(reference.transitions));
  expect(bits(kernel.records)).toBe(bits(reference.records));
  expect(bits(kernel.first)).toBe(bits(reference.first));
  expect(bits([kernel.logLikelihood])).toBe(bits([reference.logLikelihood]));
}

describe('the WebAssembly E-step (em-kernel.ts, assembly/em-kernel.ts)', () => {
  // k = 3 … 9 and 1–3 matrices; P with two structural zeros, E confusing a state with its neighbours
  // only (as on the observer bench), so that supports are partial; every record stays possible.
  const cases = [[3, 1], [4, 2], [5, 3], [8, 1], [9, 2]] as const;
  for (const [k, m] of cases) {
    it(`gives errorEStep's numbers bit for bit (k = ${k}, ${m} error matrices, unsurveyed steps)`, () => {
      const random = randomStreams(1000 + 10 * k + m).stream('em-kernel');
      const records = inventedRecords(random, 300, k, m);
      const kernel = errorEStepKernel(records, k, m);
      let unsurveyed = 0;
      for (let q = 0; q < records.count; q++) unsurveyed += records.at[records.start[q + 1]! - 1]! + 1 - (records.start[q + 1]! - records.start[q]!);
      expect(unsurveyed).toBeGreaterThan(100);
      for (let round = 0; round < 4; round++) {
        const p = rows(random, k, k, (i, j) => (i === 0 && j === k - 1) || (i === k - 1 && j === 0));
        const e = rows(random, m * k, k, (x, r) => Math.abs(x - r) > 1);
        const pi = rows(random, 1, k, () => false);
        // Assessment counts on E's support, some cells left at 0.
        const assessment = new Float64Array(m * k * k);
        for (let c = 0; c < assessment.length; c++) if (e[c]! > 0 && random.uniform() < 0.7) assessment[c] = random.integer(20);
        const reference = errorEStep(records, assessment, pi, p, e, k);
        const fromKernel = kernel.eStep(assessment, pi, p, e);
        expectSameBits(fromKernel, reference);
        // Not vacuous: every site's steps are counted (transitions sum to Σ n·(T − 1)), the likelihood is a probability's log.
        let steps = 0;
        for (let q = 0; q < records.count; q++) steps += records.sites[q]! * records.at[records.start[q + 1]! - 1]!;
        expect(fromKernel.transitions.reduce((a, b) => a + b, 0)).toBeCloseTo(steps, 6);
        expect(fromKernel.first.reduce((a, b) => a + b, 0)).toBeCloseTo(records.sites.reduce((a, b) => a + b, 0), 9);
        expect(fromKernel.logLikelihood).toBeLessThan(0);
      }
    });
  }

  it('refuses parameters of another size, and a kernel whose memory another has taken', () => {
    const random = randomStreams(7).stream('em-kernel');
    const records = inventedRecords(random, 20, 4, 1);
    const first = errorEStepKernel(records, 4, 1);
    const p = rows(random, 4, 4, () => false);
    const pi = rows(random, 1, 4, () => false);
    expect(() => first.eStep(new Float64Array(32), pi, p, new Float64Array(32))).toThrow(/another size/);
    const second = errorEStepKernel(inventedRecords(random, 50, 4, 1), 4, 1);
    expect(() => first.eStep(new Float64Array(16), pi, p, p)).toThrow(/another took its memory/);
    expect(Number.isFinite(second.eStep(new Float64Array(16), pi, p, p).logLikelihood)).toBe(true);
  });
});
