import { describe, expect, it } from 'vitest';
import { hindcast } from '../../src/evaluation/hindcast.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import type { SurveyRecord, SurveyTable } from '../../src/data/survey.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';

const TRUE = [[0.8, 0.15, 0.05], [0.1, 0.75, 0.15], [0.05, 0.1, 0.85]];

function surveys(random: RandomStream, sites: number, years: number): SurveyTable {
  const records: SurveyRecord[] = [];
  let line = 2;
  for (let s = 0; s < sites; s++) {
    let state = random.integer(3);
    for (let t = 0; t < years; t++) {
      records.push({ site: `s${s}`, time: 2000 + t, state, line: line++ });
      let u = random.uniform();
      let next = 0;
      while (next < 2 && (u -= TRUE[state]![next]!) >= 0) next += 1;
      state = next;
    }
  }
  return tableFromRecords('simulated', ['a', 'b', 'c'], records);
}

describe('coverage of the 90% prediction bands (simulation from a known chain)', () => {
  it('is close to 90%: independent survey histories, one hindcast each, 1 and 2 steps ahead', () => {
    // Each replicate is a fresh history of 100 sites, scored once (origin 2001), so replicates are
    // independent: 200 at one step (3 years of surveys) and 100 at two steps (4 years). Equal-tailed
    // bands of whole plot counts cover at least their level (0.938 here with the true matrix, found
    // separately), so the accepted range is 0.88–0.97; with ≈ 900 (case, state) pairs the standard
    // error is about 0.01. (Several origins from one history are correlated and swing more.)
    const random = randomStreams(2007);
    let inside = 0;
    let total = 0;
    for (const [replicates, years, steps] of [[200, 3, 1], [100, 4, 2]] as const) {
      for (let rep = 0; rep < replicates; rep++) {
        const table = surveys(random, 100, years);
        const { cases } = hindcast(table, DEFAULT_FIT_SETTINGS, { horizons: [steps], draws: 300, level: 0.9, random: randomStreams(1000 * years + rep) });
        for (const c of cases.filter((x) => x.origin === 2001)) { inside += c.covered; total += c.states; }
      }
    }
    const coverage = inside / total;
    expect(total).toBe(900);
    expect(coverage).toBeGreaterThan(0.88);
    expect(coverage).toBeLessThan(0.97);
  });
});
