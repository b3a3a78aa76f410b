import { describe, expect, it } from 'vitest';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { SereError } from '../../src/errors.js';

const file = (name: string): string => `test/fixtures/scenarios/${name}`;

function errorOf(name: string): SereError {
  try { loadScenario(file(name)); } catch (err) { if (err instanceof SereError) return err; throw err; }
  throw new Error('expected a SereError');
}

describe('variation in scenario files', () => {
  it('defaults to estimated with three or more survey periods, none with fewer', () => {
    expect(loadScenario(file('good.yaml')).variation).toEqual({ kind: 'estimated' }); // hand.csv: six periods
    expect(loadScenario(file('variation-default-none.yaml')).variation).toEqual({ kind: 'none' }); // grouped.csv: two periods
  });

  it('a concentration map gives the listed states κ and leaves the others fixed', () => {
    const v = loadScenario(file('variation-given.yaml')).variation;
    expect(v.kind).toBe('given');
    if (v.kind === 'given') expect(Array.from(v.concentration)).toEqual([20, Infinity, Infinity]);
  });

  const cases: [string, string, { line: number; column: number; path: string }][] = [
    ['variation-bad.yaml', 'BAD_SCENARIO', { line: 3, column: 12, path: 'variation' }],
    ['variation-unknown-state.yaml', 'UNKNOWN_STATE', { line: 4, column: 37, path: 'variation.concentration.woodland' }],
    ['variation-negative.yaml', 'BAD_SCENARIO', { line: 3, column: 29, path: 'variation.concentration' }],
    ['variation-too-few.yaml', 'BAD_SCENARIO', { line: 3, column: 12, path: 'variation' }],
  ];
  for (const [name, code, place] of cases) {
    it(`${name} → ${code} at ${place.line}:${place.column} (${place.path})`, () => {
      const err = errorOf(name);
      expect(err.code).toBe(code);
      expect(err.place).toEqual({ file: file(name), ...place });
    });
  }
});
