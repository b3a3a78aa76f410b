import { describe, expect, it } from 'vitest';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { SereError } from '../../src/errors.js';

const file = (name: string): string => `test/fixtures/scenarios/${name}`;

function errorOf(name: string): SereError {
  try { loadScenario(file(name)); } catch (err) { if (err instanceof SereError) return err; throw err; }
  throw new Error('expected a SereError');
}

describe('landscape targets in scenario files', () => {
  it('resolves a set of states with a cap and a run length; the old { state, share } is the one-state at_least', () => {
    expect(loadScenario(file('target-set.yaml')).target).toEqual({ states: [1, 2], bound: 'at-most', threshold: 0.3, staysMet: 2 });
    expect(loadScenario(file('good.yaml')).target).toEqual({ states: [2], bound: 'at-least', threshold: 0.5, staysMet: 1 });
  });

  // Fixtures: target at line 3; its keys from line 4, values after "  states: " at column 11.
  const cases: [string, string, { line: number; column: number; path: string }][] = [
    ['target-unknown-state.yaml', 'UNKNOWN_STATE', { line: 4, column: 15, path: 'target.states[1]' }],
    ['target-empty.yaml', 'BAD_SCENARIO', { line: 4, column: 11, path: 'target.states' }],
    ['target-duplicate.yaml', 'BAD_SCENARIO', { line: 4, column: 18, path: 'target.states[2]' }],
    ['target-both-bounds.yaml', 'BAD_SCENARIO', { line: 6, column: 12, path: 'target.at_most' }],
    ['target-out-of-range.yaml', 'BAD_SCENARIO', { line: 5, column: 12, path: 'target.at_most' }],
    ['target-state-and-states.yaml', 'BAD_SCENARIO', { line: 5, column: 11, path: 'target.states' }],
    ['target-no-bound.yaml', 'BAD_SCENARIO', { line: 4, column: 3, path: 'target' }],
    ['target-stays-too-long.yaml', 'BAD_SCENARIO', { line: 6, column: 14, path: 'target.stays_met' }],
    ['target-stays-step.yaml', 'BAD_SCENARIO', { line: 7, column: 14, path: 'target.stays_met' }],
  ];
  for (const [name, code, place] of cases) {
    it(`${name} → ${code} at ${place.line}:${place.column} (${place.path})`, () => {
      const err = errorOf(name);
      expect(err.code).toBe(code);
      expect(err.place).toEqual({ file: file(name), ...place });
    });
  }
});
