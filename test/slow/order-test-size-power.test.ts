import { describe, expect, it } from 'vitest';
import { chiSquareUpperTail } from '../../src/chain/chi-square.js';
import { stratifiedIndependence } from '../../src/chain/contingency.js';
import { orderOneVsTwo } from '../../src/chain/markov-tests.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';

const pick = (random: RandomStream, p: readonly number[]): number => {
  let u = random.uniform();
  for (let s = 0; s < p.length - 1; s++) { u -= p[s]!; if (u < 0) return s; }
  return p.length - 1;
};

/** Runs of three from `sites` sequences of `length` surveys; `next(prev, cur)` gives the next state's probabilities. */
function triples(random: RandomStream, sites: number, length: number, next: (prev: number, cur: number) => readonly number[]): [number, number, number, number][] {
  const counts = new Map<number, number>();
  for (let s = 0; s < sites; s++) {
    let prev = random.integer(3);
    let cur = pick(random, next(prev, prev));
    for (let t = 2; t < length; t++) {
      const after = pick(random, next(prev, cur));
      const key = (prev * 3 + cur) * 3 + after;
      counts.set(key, (counts.get(key) ?? 0) + 1);
      prev = cur;
      cur = after;
    }
  }
  return [...counts].map(([key, n]) => [Math.floor(key / 9), Math.floor(key / 3) % 3, key % 3, n]);
}

const P = [[0.7, 0.2, 0.1], [0.15, 0.7, 0.15], [0.1, 0.3, 0.6]];
const rejects = (t: [number, number, number, number][]): boolean => {
  const stat = stratifiedIndependence(orderOneVsTwo(t, 3));
  return chiSquareUpperTail(stat.g2, stat.df) < 0.05;
};

describe('order 1 vs 2 by simulation (fixed seeds)', () => {
  it('has about its nominal size on first-order data: 300 replicates of 200 sites × 6 surveys reject 5–27 times at α = 0.05', () => {
    // Expected 15 rejections; binomial sd √(300 · 0.05 · 0.95) ≈ 3.8, so the range is ±3 sd
    // (a correct test falls outside it about 0.3% of the time, for this fixed seed never).
    const random = randomStreams(1957);
    let count = 0;
    for (let r = 0; r < 300; r++) if (rejects(triples(random, 200, 6, (_prev, cur) => P[cur]!))) count += 1;
    expect(count).toBeGreaterThanOrEqual(5);
    expect(count).toBeLessThanOrEqual(27);
  });

  it('has power on second-order data: when the previous state shifts the next one, ≥ 95 of 100 replicates reject', () => {
    // Second order: after a change of state (prev ≠ cur) a site tends to return to where it was.
    const second = (prev: number, cur: number): number[] =>
      prev === cur ? P[cur]! : P[cur]!.map((p, s) => 0.5 * p + (s === prev ? 0.5 : 0));
    const random = randomStreams(1975);
    let count = 0;
    for (let r = 0; r < 100; r++) if (rejects(triples(random, 200, 6, second))) count += 1;
    expect(count).toBeGreaterThanOrEqual(95);
  });
});
