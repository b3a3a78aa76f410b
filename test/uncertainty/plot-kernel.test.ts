import { describe, expect, it } from 'vitest';
import { multinomialSampler } from '../../src/uncertainty/multinomial.js';
import { generatorOfKey, randomStreams, streamKey } from '../../src/uncertainty/random.js';
import { yearKernel } from '../../src/uncertainty/year-kernel.js';

/**
 * A random probability row of width w: some structural zeros, some cells near 1 (p > ½: the flipped
 * binomial), weights spread over orders of magnitude (small p: inversion; with large n: BTPE).
 */
function rowOf(r: { uniform(): number }, w: number, into: Float64Array, at: number): void {
  let sum = 0;
  for (let j = 0; j < w; j++) {
    const u = r.uniform();
    const x = u < 0.2 ? 0 : u < 0.3 ? 50 : r.uniform() ** 6;
    into[at + j] = x;
    sum += x;
  }
  if (sum === 0) { into[at + w - 1] = 1; sum = 1; }
  for (let j = 0; j < w; j++) into[at + j]! /= sum;
}

/** Counts from 1 to 10⁶, log-uniform, so inversion, BTPE's every region and step 5.1–5.3 all occur. */
const countOf = (r: { uniform(): number }): number => (r.uniform() < 0.1 ? 1 : Math.floor(10 ** (6 * r.uniform())));

describe('the WebAssembly multinomial (plot counts) against multinomial.ts', () => {
  it('the same counts, bit for bit, and the stream left in step: 60,000 multinomials over 200 seeds, widths 2–12, counts 1–10⁶', () => {
    let cases = 0;
    let btpe = 0;
    for (let seed = 1; seed <= 200; seed++) {
      const r = randomStreams(seed).stream('cases');
      const width = 2 + (seed % 11);
      const keys = new Uint32Array(16);
      keys.set(streamKey(seed, 'plots:a'), 0);
      keys.set(streamKey(seed, 'plots:b'), 8);
      const kernel = yearKernel(width, 2, 1, { matrices: width, counts: width });
      kernel.startStream(0, keys, 0);
      kernel.startStream(1, keys, 8);
      const js = [multinomialSampler(generatorOfKey(keys, 0)), multinomialSampler(generatorOfKey(keys, 8))];
      const p = new Float64Array(width);
      const out = new Int32Array(width);
      for (let c = 0; c < 300; c++) {
        rowOf(r, width, p, 0);
        const n = countOf(r);
        if (n * Math.min(p[0]!, 1 - p[0]!) >= 10) btpe += 1; // the first cell's binomial, at least, by BTPE
        const stream = (c * 5 + seed) % 2; // two streams taken in a shuffled order, as the plot step takes plots and recording
        kernel.matrices.set(p);
        kernel.counts.fill(0);
        out.fill(0);
        kernel.multinomial(stream, n, kernel.matrices, 0, width, 0);
        js[stream]!(n, p, 0, width, out, 0);
        expect(Array.from(kernel.counts), `seed ${seed}, case ${c}, n ${n}`).toEqual(Array.from(out));
        expect(out.reduce((a, x) => a + x, 0)).toBe(n);
        cases += 1;
      }
    }
    expect(cases).toBe(60_000);
    expect(btpe).toBeGreaterThan(15_000);
  });

  it('moveRows moves every row of a k × k matrix as the plot step calls the multinomial, adding to the counts there', () => {
    for (let seed = 1; seed <= 50; seed++) {
      const r = randomStreams(seed).stream('rows');
      const k = 2 + (seed % 9);
      const keys = streamKey(seed, 'plots');
      const kernel = yearKernel(k, 1, 1, { matrices: 3 * k * k, counts: 2 * k });
      kernel.startStream(0, keys, 0);
      const multinomial = multinomialSampler(generatorOfKey(keys));
      const M = new Float64Array(3 * k * k);
      const now = new Int32Array(k);
      const next = new Int32Array(k);
      for (let step = 0; step < 40; step++) {
        const recipe = step % 3;
        for (let i = 0; i < k; i++) rowOf(r, k, M, recipe * k * k + i * k);
        for (let i = 0; i < k; i++) now[i] = r.uniform() < 0.3 ? 0 : countOf(r);
        next.fill(7);
        kernel.matrices.set(M);
        kernel.counts.set(now, 0);
        kernel.counts.fill(7, k);
        kernel.moveRows(0, kernel.matrices, recipe * k * k, 0, k);
        for (let i = 0; i < k; i++) if (now[i]! > 0) multinomial(now[i]!, M, recipe * k * k + i * k, k, next, 0);
        expect(Array.from(kernel.counts.subarray(k)), `seed ${seed}, step ${step}`).toEqual(Array.from(next));
        expect(Array.from(kernel.counts.subarray(0, k))).toEqual(Array.from(now));
      }
    }
  });

  it('refuses matrices and counts outside its room, and matrices from anywhere else', () => {
    const kernel = yearKernel(3, 1, 1, { matrices: 9, counts: 6 });
    expect(() => kernel.moveRows(0, kernel.matrices, 1, 0, 3)).toThrow(/outside/);
    expect(() => kernel.moveRows(0, kernel.matrices, 0, 4, 0)).toThrow(/outside/);
    expect(() => kernel.multinomial(0, 5, new Float64Array(3), 0, 3, 0)).toThrow(/its own/);
    expect(() => kernel.multinomial(1, 5, kernel.matrices, 0, 3, 0)).toThrow(/stream/);
  });
});
