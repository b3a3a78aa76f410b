import { describe, expect, it } from 'vitest';
import { communicatingClasses } from '../../src/chain/classes.js';
import { stationaryGivenClasses } from '../../src/chain/stationary.js';
import { StationaryByPattern } from '../../src/engine/stationary-by-pattern.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { stationaryInKernel } from '../../src/uncertainty/year-kernel.js';

const bitsEqual = (a: ArrayLike<number>, b: ArrayLike<number>): boolean =>
  a.length === b.length && Array.from(a).every((x, i) => Object.is(x, b[i]));

/** A random row-stochastic k × k matrix, a quarter of its cells zero (so some have transient states or two closed classes). */
function randomChain(seed: number, k: number): Float64Array {
  const r = randomStreams(seed).stream('stationary-kernel');
  const P = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    let sum = 0;
    for (let j = 0; j < k; j++) { const w = r.uniform() < 0.25 ? 0 : r.uniform() ** 3; P[i * k + j] = w; sum += w; }
    if (sum === 0) { P[i * k + i] = 1; sum = 1; }
    for (let j = 0; j < k; j++) P[i * k + j]! /= sum;
  }
  return P;
}

describe('the long-run mix in the kernel (year-kernel.ts stationaryInKernel)', () => {
  it('gives chain/stationary.ts\'s mix bit for bit: 600 random chains of 1–12 states, and nearly absorbing ones past the double range', () => {
    const chains: { P: Float64Array; k: number }[] = [];
    for (let seed = 1; seed <= 600; seed++) chains.push({ P: randomChain(seed, 1 + (seed % 12)), k: 1 + (seed % 12) });
    // The birth–death chain of test/chain/stationary.test.ts whose last state leaves with chance 1e-312,
    // in both orders: gth's two overflow branches (a row divided instead of a column; shares rescaled).
    for (const order of [[0, 1, 2], [2, 1, 0]]) {
      const P = new Float64Array(9);
      const at = (i: number, j: number): number => order[i]! * 3 + order[j]!;
      const up = [0.3, 0.1];
      const down = [0.25, 1e-312];
      for (let i = 0; i < 2; i++) { P[at(i, i + 1)] = up[i]!; P[at(i + 1, i)] = down[i]!; }
      for (let i = 0; i < 3; i++) { let t = 0; for (let j = 0; j < 3; j++) if (j !== i) t += P[at(i, j)]!; P[at(i, i)] = 1 - t; }
      chains.push({ P, k: 3 });
    }
    let unique = 0;
    let notUnique = 0;
    for (const { P, k } of chains) {
      const classes = communicatingClasses(P, k, 0);
      const js = stationaryGivenClasses(P, k, 0, classes);
      const closed = classes.classes.filter((_, c) => classes.closed[c]);
      const byPattern = new StationaryByPattern(k).mixOf(P, 0);
      if (!js.unique) {
        expect(byPattern).toBeNull();
        notUnique += 1;
        continue;
      }
      expect(bitsEqual(stationaryInKernel(P, k, 0, Int32Array.from(closed[0]!)), js.mix)).toBe(true);
      expect(bitsEqual(byPattern!, js.mix)).toBe(true);
      unique += 1;
    }
    // Both kinds were met, and the nearly absorbing chains gave finite mixes.
    expect(unique).toBeGreaterThan(300);
    expect(notUnique).toBeGreaterThanOrEqual(3);
  });
});
