import { describe, expect, it } from 'vitest';
import { loadScenarios } from '../../src/scenario/load-scenario.js';
import { runForecast } from '../../src/engine/forecast.js';
import { runComparison } from '../../src/engine/compare.js';
import { threadsFor, MIN_THREADED_WORK } from '../../src/engine/threads.js';
import { DRAW_BLOCK } from '../../src/uncertainty/draw-blocks.js';
import { forecastJson } from '../../src/report/forecast-json.js';
import { comparisonJson } from '../../src/report/compare-json.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { sere } from '../cli/binary.js';

/**
 * Blocks of draws take their own random sub-streams and write disjoint memory, so any number of
 * threads gives the same bytes. 2,500 draws are three blocks (the last one short): one, two and
 * three threads split them differently. In-process (the worker from dist/src) and through the
 * bundle (dist/cli/engine-worker.mjs).
 */
const demo = (name: string): string => `scenarios/brenhollow/${name}.yaml`;
const DRAWS = 2 * DRAW_BLOCK + 452;

describe('the same JSON on any number of threads', () => {
  for (const name of ['storm-surges', 'sow-pioneer', 'cap-rank-grass']) {
    it(`forecast ${name} on 1, 2 and 3 threads, and in one-year chunks`, () => {
      const s = { ...loadScenarios(demo(name))[0]!, draws: DRAWS };
      const run = (threads: number, chunkBytes?: number): string =>
        JSON.stringify(forecastJson([runForecast(s, randomStreams(s.seed!), undefined, { threads, chunkBytes })]));
      const one = run(1);
      // The demo's record has nine survey periods: year-to-year variation is on by default, so each
      // block's year streams (year-matrix.ts) are exercised too.
      expect(s.variation.kind).toBe('estimated');
      expect(one).toContain('"variation":{');
      expect(run(2)).toBe(one);
      expect(run(3)).toBe(one);
      expect(run(3, 1)).toBe(one);
    });
  }

  it('compare options.yaml on 1, 2 and 3 threads', () => {
    const scenarios = loadScenarios(demo('options')).map((s) => ({ ...s, draws: DRAWS }));
    const run = (threads: number): string =>
      JSON.stringify(comparisonJson(runComparison(scenarios, randomStreams(scenarios[0]!.seed!), undefined, {}, { threads })));
    const one = run(1);
    expect(run(2)).toBe(one);
    expect(run(3)).toBe(one);
  });

  it('the command line, --threads 1, 2 and 3 (the bundled worker)', () => {
    const out = [1, 2, 3].map((t) => sere(['forecast', demo('storm-surges'), '--draws', String(DRAWS), '--json', '--threads', String(t)]));
    for (const r of out) expect(r.code, r.stderr).toBe(0);
    expect(out[1]!.stdout).toBe(out[0]!.stdout);
    expect(out[2]!.stdout).toBe(out[0]!.stdout);
    const cmp = [1, 3].map((t) => sere(['compare', demo('options'), '--draws', String(DRAWS), '--json', '--threads', String(t)]));
    expect(cmp[1]!.stdout).toBe(cmp[0]!.stdout);
    expect(sere(['forecast', demo('no-action'), '--threads', '0']).code).toBe(2);
  });
});

describe('how many threads', () => {
  it('one for small runs, every core for large ones, as asked when asked, never more than the blocks', () => {
    expect(threadsFor(undefined, 4000, 31, 5, 1)).toBe(1);
    expect(threadsFor(undefined, 100_000, 101, 10, 1)).toBeGreaterThanOrEqual(1);
    expect(100_000 * 101 * 100).toBeGreaterThan(MIN_THREADED_WORK);
    expect(threadsFor(4, 4000, 31, 5, 1)).toBe(4);
    expect(threadsFor(8, DRAWS, 31, 5, 1)).toBe(3);
    expect(threadsFor(2, 10, 31, 5, 1)).toBe(1);
  });
});
