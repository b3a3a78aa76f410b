import { describe, expect, it } from 'vitest';
import { stationaryMix } from '../../src/chain/stationary.js';
import { check, expectClose, flat, toleranceOf } from './checks.js';

function uniqueMix(rows: number[][]): Float64Array {
  const result = stationaryMix(flat(rows), rows.length);
  if (!result.unique) throw new Error('expected a unique stationary mix');
  return result.mix;
}

describe('stationary mix by GTH', () => {
  it('Land of Oz: w = (.4, .2, .4) — Grinstead & Snell ch. 11, Examples 11.1 and 11.19–11.20', () => {
    const c = check('stationary_land_of_oz');
    expectClose(uniqueMix(c.inputs['P'] as number[][]), c.expected['w'], toleranceOf(c, 'w'), 'w');
  });

  it('Ehrenfest urn (periodic, ergodic): binomial(4, 1/2) — Grinstead & Snell ch. 11, Examples 11.8 and 11.17', () => {
    const c = check('stationary_ehrenfest_4');
    expectClose(uniqueMix(c.inputs['P'] as number[][]), c.expected['w'], toleranceOf(c, 'w'), 'w');
  });

  it("Horn's tree-by-tree forest chain (Begon, Harper & Townsend Table 16.1; scipy reference values)", () => {
    const c = check('stationary_horn_forest');
    expectClose(uniqueMix(c.inputs['P'] as number[][]), c.expected['w'], toleranceOf(c, 'w'), 'w');
  });

  it('Kemeny & Snell Example 3 (reflecting random walk): w = (.1, .2, .4, .2, .1)', () => {
    const c = check('ergodic_kemeny_snell_example3');
    expectClose(uniqueMix(c.inputs['P'] as number[][]), c.expected['w'], toleranceOf(c, 'w'), 'w');
  });

  it('drunkard\'s walk (canonical order 1,2,3,0,4) has two closed classes, so no unique mix — Grinstead & Snell Example 11.13', () => {
    const c = check('absorbing_drunkards_walk');
    const P = c.inputs['P'] as number[][];
    const result = stationaryMix(flat(P), P.length);
    expect(result.unique).toBe(false);
    if (!result.unique) expect(result.closedClasses).toEqual([[3], [4]]);
  });
});
