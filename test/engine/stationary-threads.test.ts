import { describe, expect, it } from 'vitest';
import { loadScenarios } from '../../src/scenario/load-scenario.js';
import { runForecast } from '../../src/engine/forecast.js';
import { forecastJson } from '../../src/report/forecast-json.js';
import { STATIONARY_BLOCKS_PER_THREAD, stationaryOnThreads } from '../../src/engine/stationary-draws.js';
import { stationaryOutputs } from '../../src/engine/stationary-tasks.js';
import { DRAW_BLOCK, sharedFloat64 } from '../../src/uncertainty/draw-blocks.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { stationaryGivenClasses } from '../../src/chain/stationary.js';
import { communicatingClasses } from '../../src/chain/classes.js';

/**
 * The long-run mixes are worked out a block of draws a task on the run's threads once there are
 * STATIONARY_BLOCKS_PER_THREAD blocks a thread (stationary-draws.ts): any number of threads gives the
 * same bytes, and draws without a unique mix are left out in draw order.
 */
const DRAWS = 2 * STATIONARY_BLOCKS_PER_THREAD * DRAW_BLOCK + 300;

describe('long-run mixes on threads', () => {
  it('the same mixes on 1, 2 and 3 threads, non-unique draws left out in order (two closed classes in every fifth draw)', () => {
    const k = 4;
    const r = randomStreams(31).stream('stationary-threads');
    const data = sharedFloat64(DRAWS * k * k);
    for (let d = 0; d < DRAWS; d++) {
      for (let i = 0; i < k; i++) {
        let sum = 0;
        for (let j = 0; j < k; j++) { const w = r.uniform() < 0.2 ? 0 : r.uniform(); data[(d * k + i) * k + j] = w; sum += w; }
        if (sum === 0) { data[(d * k + i) * k + i] = 1; sum = 1; }
        for (let j = 0; j < k; j++) data[(d * k + i) * k + j]! /= sum;
      }
      // Every fifth draw: states 0 and 1 absorbing, two closed classes, no unique mix.
      if (d % 5 === 0) for (const i of [0, 1]) for (let j = 0; j < k; j++) data[(d * k + i) * k + j] = i === j ? 1 : 0;
    }
    const run = (threads: number) => stationaryOnThreads({ kind: 'draws', k, count: DRAWS, data, ...stationaryOutputs(DRAWS, k) }, threads);
    const one = run(1);
    // Draw by draw, without the pattern cache: the mixes of the draws that have a unique one, in order.
    const expected: number[] = [];
    let notUnique = 0;
    for (let d = 0; d < DRAWS; d++) {
      const m = data.subarray(d * k * k, (d + 1) * k * k);
      const st = stationaryGivenClasses(m, k, 0, communicatingClasses(m, k, 0));
      if (st.unique) expected.push(...st.mix); else notUnique += 1;
    }
    expect(notUnique).toBeGreaterThanOrEqual(Math.ceil(DRAWS / 5));
    expect(one.notUnique).toBe(notUnique);
    expect(Array.from(one.mixes)).toEqual(expected);
    for (const threads of [2, 3]) {
      const many = run(threads);
      expect(many.unique).toBe(one.unique);
      expect(Buffer.from(many.mixes.buffer, many.mixes.byteOffset, many.mixes.byteLength)
        .equals(Buffer.from(one.mixes.buffer, one.mixes.byteOffset, one.mixes.byteLength))).toBe(true);
    }
  });

  for (const name of ['zoned', 'cap-rank-grass']) {
    it(`forecast ${name} with ${DRAWS} draws: the same JSON, long-run mixes under treatment included, on 1 and 2 threads`, () => {
      const s = { ...loadScenarios(`scenarios/brenhollow/${name}.yaml`)[0]!, draws: DRAWS };
      const run = (threads: number): string => JSON.stringify(forecastJson([runForecast(s, randomStreams(s.seed!), undefined, { threads })]));
      const one = run(1);
      expect(one).toContain('"stationary_treated":{');
      expect(run(2)).toBe(one);
    });
  }
});
