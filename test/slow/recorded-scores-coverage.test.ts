import { describe, expect, it } from 'vitest';
import { scoreSites } from '../../src/evaluation/site-scores.js';
import type { SurveyRecord } from '../../src/data/survey.js';
import type { MatrixDraws } from '../../src/uncertainty/draws.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import { pickFrom } from '../error-helpers.js';
import { everyDraw } from '../helpers.js';

// A known chain, first-survey mix and observer far from perfect (row = true state, column = recorded).
const P = [[0.8, 0.15, 0.05], [0.1, 0.75, 0.15], [0.05, 0.1, 0.85]];
const E = [[0.7, 0.2, 0.1], [0.15, 0.7, 0.15], [0.1, 0.2, 0.7]];
const PI = [0.5, 0.3, 0.2];
const SITES = 40;
/** Surveys at 0 … 5; the score is of the survey at 5 from the origin 4 (and at 5 from 3: two steps). */
const YEARS = 6;
const D = 1000;
const REPLICATES = 250;

/** Draws at the known P and E: what is checked is the filter, the recording step and the bands, not the posterior. */
function knownDraws(withErrors: boolean): MatrixDraws {
  return {
    k: 3, count: D, source: 'point', notes: [],
    data: everyDraw(P, D),
    ...(withErrors ? { emissions: everyDraw(E, D) } : {}),
  };
}

/** Every site's true path from π through P, each year recorded through E, independently of the code under test. */
function recordedSurveys(random: RandomStream): SurveyRecord[] {
  const out: SurveyRecord[] = [];
  for (let s = 0; s < SITES; s++) {
    let x = pickFrom(random, PI);
    for (let t = 0; t < YEARS; t++) {
      if (t > 0) x = pickFrom(random, P[x]!);
      out.push({ site: `s${String(s).padStart(3, '0')}`, time: 2000 + t, state: pickFrom(random, E[x]!), line: 2 + s * YEARS + t });
    }
  }
  return out;
}

describe('scores on the recorded scale are calibrated (simulation)', () => {
  it('90% bands of the recorded counts, one and two steps ahead, cover simulated records at least 90% of the time; the true-scale bands do not', () => {
    const random = randomStreams(20261202);
    const tally = { recorded: 0, asTrue: 0, bands: 0 };
    const [throughE, plainDraws] = [knownDraws(true), knownDraws(false)];
    for (let r = 0; r < REPLICATES; r++) {
      const records = recordedSurveys(random.stream(`replicate:${r}`));
      for (const origin of [2004, 2003]) {
        const counts = [0, 0, 0];
        for (const x of records) if (x.time === origin) counts[x.state]! += 1;
        const at = { origin, target: 2005, step: 1, originCounts: counts, level: 0.9, initial: PI };
        const rec = scoreSites(throughE, records, at, random.stream(`bands:${r}:${origin}`))!;
        const plain = scoreSites(plainDraws, records, at, random.stream(`bands:${r}:${origin}`))!;
        expect(rec.scale).toBe('recorded');
        tally.recorded += rec.covered;
        tally.asTrue += plain.covered;
        tally.bands += 3;
      }
    }
    const rate = tally.recorded / tally.bands;
    const trueRate = tally.asTrue / tally.bands;
    // 1,500 bands: at a true rate of 0.90 the sd of the observed rate is 0.0077. Whole-number bands
    // cover at least their level, so the floor 0.877 (3 sd below 0.90; false alarm about 0.1%) is
    // one-sided; the ceiling 0.99 catches bands so wide they say nothing.
    expect(rate).toBeGreaterThan(0.877);
    expect(rate).toBeLessThan(0.99);
    // The chain's true-state predictions from the last record, scored against records, miss more often.
    expect(trueRate).toBeLessThan(rate - 0.05);
    console.log(`recorded-scale coverage ${rate.toFixed(3)}, true-scale ${trueRate.toFixed(3)} over ${tally.bands} bands`);
  }, 60_000);
});
