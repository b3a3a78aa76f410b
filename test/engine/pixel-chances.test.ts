import { describe, expect, it } from 'vitest';
import { matrix, multiply, add, pow } from 'mathjs';
import { meanMatrixPowers } from '../../src/engine/pixel-chances.js';
import { drawsOf } from '../helpers.js';

type Rows = number[][];
const toRows = (m: Float64Array, k: number): Rows => Array.from({ length: k }, (_, i) => Array.from(m.subarray(i * k, i * k + k)));
const power = (p: Rows, h: number): Rows => (pow(matrix(p), h) as unknown as { toArray(): Rows }).toArray();

describe('meanMatrixPowers: the posterior mean of Pʰ a map pixel shows', () => {
  const p1 = [[0.9, 0.1, 0], [0.2, 0.5, 0.3], [0, 0.4, 0.6]];
  const p2 = [[0.5, 0.5, 0], [0.1, 0.8, 0.1], [0.3, 0.3, 0.4]];

  it('averages the draws\' powers (mathjs matrix powers), which is not the power of the averaged matrix', () => {
    const [one, three] = meanMatrixPowers(drawsOf([p1, p2]), [1, 3]);
    const meanOfPowers = (multiply(add(matrix(power(p1, 3)), matrix(power(p2, 3))), 0.5) as unknown as { toArray(): Rows }).toArray();
    const powerOfMean = power((multiply(add(matrix(p1), matrix(p2)), 0.5) as unknown as { toArray(): Rows }).toArray(), 3);
    toRows(one!, 3).forEach((row, i) => row.forEach((x, j) => expect(x).toBeCloseTo((p1[i]![j]! + p2[i]![j]!) / 2, 14)));
    toRows(three!, 3).forEach((row, i) => row.forEach((x, j) => expect(x).toBeCloseTo(meanOfPowers[i]![j]!, 14)));
    // The two differ here by more than rounding: the mean of powers is what is drawn.
    expect(Math.abs(toRows(three!, 3)[0]![0]! - powerOfMean[0]![0]!)).toBeGreaterThan(1e-3);
  });

  it('keeps every row a distribution', () => {
    const [m] = meanMatrixPowers(drawsOf([p1, p2]), [7]);
    for (const row of toRows(m!, 3)) expect(row.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 14);
  });
});
