import { describe, expect, it } from 'vitest';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { SereError } from '../../src/errors.js';

const file = (name: string): string => `test/fixtures/scenarios/${name}`;

function errorOf(name: string): SereError {
  try { loadScenario(file(name)); } catch (err) { if (err instanceof SereError) return err; throw err; }
  throw new Error('expected a SereError');
}

describe('loadScenario', () => {
  it('resolves data relative to the scenario, fills defaults and resolves the target', () => {
    const s = loadScenario(file('good.yaml'));
    expect(s.fit.states).toEqual(['a', 'b', 'c']);
    expect(s.fit.input.file).toBe('test/fixtures/hand.csv');
    expect(s).toMatchObject({ name: 'hand-made', source: 'posterior', draws: 200, seed: 11, horizonSteps: 5,
      showSteps: [0, 5], level: 0.9, target: { states: [2], bound: 'at-least', threshold: 0.5, staysMet: 1 } });
    expect(s.start.year).toBe(7);
    // Site A surveyed at 7 in c; site B last surveyed at 5 in b, carried forward two steps through the
    // MLE [[1/3, 2/3, 0], [1/3, 1/3, 1/3], [0, 1/2, 1/2]]: e_b·P² = (2/9, 1/2, 5/18), averaged with (0, 0, 1).
    expect(Array.from(s.start.shares).map((x) => x.toFixed(12))).toEqual([1 / 9, 1 / 4, 23 / 36].map((x) => x.toFixed(12)));
    expect(s.start.carried).toEqual([{ state: 1, steps: 2, sites: 1 }]);
  });

  const cases: [string, string, { file?: string; line?: number; column?: number; path?: string }][] = [
    ['typo.yaml', 'BAD_SCENARIO', { line: 3, column: 1, path: 'targte' }],
    ['unknown-state.yaml', 'UNKNOWN_STATE', { line: 4, column: 10, path: 'target.state' }],
    ['shares.yaml', 'BAD_SHARES', { line: 5, column: 11, path: 'start.shares' }],
    ['bad-draws.yaml', 'BAD_SCENARIO', { line: 3, column: 10, path: 'uncertainty.draws' }],
    ['bad-yaml.yaml', 'BAD_YAML', { line: 3 }],
    ['missing-data.yaml', 'BAD_SCENARIO', { line: 1, path: 'data' }],
    ['bad-csv.yaml', 'BAD_TIME', { file: 'test/fixtures/bad-time.csv', line: 3, column: 2 }],
    ['show-beyond.yaml', 'BAD_SCENARIO', { line: 3, column: 11, path: 'show[1]' }],
    // A column the table lacks, named by the scenario: the scenario's setting is the place.
    ['column-typo.yaml', 'MISSING_COLUMN', { line: 3, column: 20, path: 'fit.columns.site' }],
    // 'bb' declared and never surveyed, 'b' surveyed and not declared: the declared list is the place.
    ['declared-typo.yaml', 'UNKNOWN_STATE', { line: 3, path: 'fit.states' }],
  ];
  for (const [name, code, place] of cases) {
    it(`${name} → ${code} at ${JSON.stringify(place)}`, () => {
      const err = errorOf(name);
      expect(err.code).toBe(code);
      expect(err.place).toMatchObject({ file: file(name), ...place });
    });
  }
});
