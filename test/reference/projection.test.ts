import { describe, it } from 'vitest';
import { propagate } from '../../src/engine/propagate.js';
import { mixAt } from '../../src/engine/layout.js';
import { drawsOf } from '../helpers.js';
import { check, expectClose, toleranceOf } from './checks.js';

describe('projection x_{t+1} = x_t P', () => {
  const c = check('projection_land_of_oz');
  const P = c.inputs['P'] as number[][];
  const draws = drawsOf([P]);
  const sharesAt = (start: number[], t: number, horizon: number): number[] => {
    const paths = propagate(draws, start, horizon);
    return mixAt(paths.shares, paths, 0, t);
  };

  it('Land of Oz P² and P⁶ rows: Grinstead & Snell ch. 11, Example 11.2 / Table 11.1', () => {
    const P2 = [0, 1, 2].map((i) => sharesAt([0, 1, 2].map((j) => (j === i ? 1 : 0)), 2, 6));
    const P6 = [0, 1, 2].map((i) => sharesAt([0, 1, 2].map((j) => (j === i ? 1 : 0)), 6, 6));
    expectClose(P2, c.expected['P2'], toleranceOf(c, 'P2'), 'P2');
    expectClose(P6, c.expected['P6'], toleranceOf(c, 'P6'), 'P6');
  });

  it('u⁽³⁾ from (1/3, 1/3, 1/3) = (77/192, 19/96, 77/192): Grinstead & Snell, after Theorem 11.2 (derived value)', () => {
    expectClose(sharesAt(c.inputs['u0'] as number[], 3, 3), c.expected['u3_from_uniform'], toleranceOf(c, 'u3_from_uniform'), 'u3');
  });
});
