import { describe, expect, it } from 'vitest';
import { inverseCdfState } from '../../src/uncertainty/categorical.js';

describe('inverseCdfState', () => {
  it('gives the first state whose running total passes u, skipping states without mass', () => {
    const row = [9, 0.2, 0, 0.5, 0.3, 9]; // the row is row[1 … 5)
    expect(inverseCdfState(row, 1, 4, 0)).toBe(0);
    expect(inverseCdfState(row, 1, 4, 0.19)).toBe(0);
    expect(inverseCdfState(row, 1, 4, 0.2)).toBe(2); // state 1 has no mass
    expect(inverseCdfState(row, 1, 4, 0.69)).toBe(2);
    expect(inverseCdfState(row, 1, 4, 0.71)).toBe(3);
  });
  it('gives a u left above a row that sums to just under 1 to the last state with mass', () => {
    const row = [0.25, 0.75 - 1e-12, 0];
    expect(inverseCdfState(row, 0, 3, 1 - 1e-13)).toBe(1);
  });
});
