import { describe, expect, it } from 'vitest';
import { loadScenario, loadScenarios } from '../../src/scenario/load-scenario.js';
import { runForecast } from '../../src/engine/forecast.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { errorOf } from '../helpers.js';

const file = (name: string): string => `test/fixtures/scenarios/${name}`;


describe('treatments and events in scenario files', () => {
  it('resolves windows and ramps into strengths per step, areas into parcels', () => {
    const s = loadScenario(file('managed.yaml'));
    const t = s.treatments[0]!;
    // Start 7, steps end in 8 … 12; acting 8–10 with a 2-year ramp: ½, 1, 1, then off.
    expect(Array.from(t.weights)).toEqual([0, 0.5, 1, 1, 0, 0]);
    expect(t).toMatchObject({ name: 'push to c', row: 1, area: 0.5, parcel: 'treatment:push to c' });
    expect(s.events[0]!.chances[1]).toBeCloseTo(0.25, 15);
    // 20 plots split by the start shares (1/9, 1/4, 23/36, with hand.csv's site B carried forward) by largest remainder.
    expect(s.plots).toEqual({ total: 20, start: [2, 5, 13], scale: 'true' });
  });

  it('gives one scenario per alternative, each with the shared and its own management', () => {
    const all = loadScenarios(file('same-twice.yaml'));
    expect(all.map((s) => s.alternative)).toEqual(['first', 'second']);
    expect(all.map((s) => s.treatments.length)).toEqual([1, 1]);
    expect(all.map((s) => s.events.length)).toEqual([1, 1]);
  });

  const cases: [string, string, string, RegExp][] = [
    ['treat-unknown-state.yaml', 'UNKNOWN_STATE', 'treatments[0].state', /unknown state 'woodland'/],
    ['treat-two-kinds.yaml', 'BAD_SCENARIO', 'treatments[0]', /exactly one of multiply, set or move/],
    ['treat-conflict.yaml', 'BAD_SCENARIO', 'treatments[1].set.c', /sets b>c in 12 while treatment 'first' also sets it/],
    ['treat-set-sum.yaml', 'BAD_SCENARIO', 'treatments[0].set', /sum to 1.2, above 1/],
    ['treat-impossible.yaml', 'BAD_SCENARIO', 'treatments[0].multiply.c', /declares impossible/],
    ['event-row-sum.yaml', 'BAD_MATRIX', 'events[0].matrix.b', /sums to 0.9/],
    ['event-two-chances.yaml', 'BAD_SCENARIO', 'events[0]', /exactly one of chance/],
    ['parcel-areas.yaml', 'BAD_SCENARIO', 'treatments[1].area', /parcel 'east' has area 0.3/],
  ];
  for (const [name, code, path, message] of cases) {
    it(`${name} → ${code} at ${path}`, () => {
      const err = errorOf(() => loadScenario(file(name)));
      expect(err.code).toBe(code);
      expect(err.place.path).toBe(path);
      expect(err.place.file).toBe(file(name));
      expect(err.place.line).toBeGreaterThan(0);
      expect(err.message).toMatch(message);
    });
  }

  it('checks factors against the fitted matrix before running: a probability pushed above 1, a change that cannot be met', () => {
    const above = errorOf(() => runForecast(loadScenario(file('treat-above-one.yaml')), randomStreams(1)));
    expect(above.code).toBe('BAD_SCENARIO');
    expect(above.message).toMatch(/pushes probabilities out of 'a' above 1/);
    expect(above.place).toMatchObject({ file: file('treat-above-one.yaml'), line: 4, path: 'treatments[0]' });
    const unmet = errorOf(() => runForecast(loadScenario(file('treat-unmet.yaml')), randomStreams(1)));
    expect(unmet.message).toMatch(/cannot be met/);
    expect(unmet.place).toMatchObject({ line: 4, path: 'treatments[0]' });
  });
});
