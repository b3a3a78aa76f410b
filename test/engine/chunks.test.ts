import { describe, expect, it } from 'vitest';
import { loadScenarios } from '../../src/scenario/load-scenario.js';
import { runForecast } from '../../src/engine/forecast.js';
import { runComparison } from '../../src/engine/compare.js';
import { chunksOf, yearsPerChunk } from '../../src/engine/chunk-years.js';
import { forecastJson } from '../../src/report/forecast-json.js';
import { comparisonJson } from '../../src/report/compare-json.js';
import { randomStreams } from '../../src/uncertainty/random.js';

/**
 * The engine summarises a chunk of years at a time (simulate.ts). Whatever the chunk — one year,
 * a few, or the whole horizon at once — every number must be the same: each draw's arithmetic and
 * each band's input are the same. (engine-golden.test.ts ties the one-chunk run to the outputs
 * recorded before chunks existed.)
 */
const demo = (name: string): string => `scenarios/brenhollow/${name}.yaml`;
const budgets = [1, 3 * 5 * 8 * 300, Infinity];

describe('results do not depend on the chunk of years held in memory', () => {
  for (const name of ['no-action', 'storm-surges', 'sow-pioneer', 'cap-rank-grass', 'new-cell']) {
    it(`forecast ${name}: one year per chunk, three, and all at once give the same JSON`, () => {
      const s = { ...loadScenarios(demo(name))[0]!, draws: 300 };
      const json = budgets.map((chunkBytes) =>
        JSON.stringify(forecastJson([runForecast(s, randomStreams(s.seed!), undefined, { chunkBytes })])));
      expect(json[0]).toBe(json[2]);
      expect(json[1]).toBe(json[2]);
    });
  }

  it('compare options.yaml (alternatives run side by side, paired at the shown years)', () => {
    const scenarios = loadScenarios(demo('options')).map((s) => ({ ...s, draws: 300 }));
    const json = budgets.map((chunkBytes) =>
      JSON.stringify(comparisonJson(runComparison(scenarios, randomStreams(scenarios[0]!.seed!), undefined, {}, { chunkBytes }))));
    expect(json[0]).toBe(json[2]);
    expect(json[1]).toBe(json[2]);
  });
});

describe('chunks of years', () => {
  it('holds as many years as the budget allows, at least one', () => {
    expect(yearsPerChunk(1_000_000, 10, 1, 256 * 1024 ** 2)).toBe(3);
    expect(yearsPerChunk(100_000, 10, 1, 256 * 1024 ** 2)).toBe(33);
    expect(yearsPerChunk(100_000, 10, 4, 1)).toBe(1);
  });

  it('covers every step once, in order, with at most perChunk kept steps each', () => {
    for (const [kept, horizon, per] of [[[0, 5, 10, 20, 30], 30, 2], [[0, 1, 2, 3], 3, 1], [[30], 30, 4], [[0, 7], 12, 5]] as const) {
      const chunks = chunksOf(kept, horizon, per);
      expect(chunks[0]!.from).toBe(0);
      expect(chunks[chunks.length - 1]!.to).toBe(horizon + 1);
      chunks.forEach((c, n) => {
        if (n > 0) expect(c.from).toBe(chunks[n - 1]!.to);
        expect(c.kept.length).toBeLessThanOrEqual(per);
        for (const t of c.kept) expect(t >= c.from && t < c.to).toBe(true);
      });
      expect(chunks.flatMap((c) => c.kept)).toEqual([...kept]);
    }
  });
});
