import { describe, expect, it } from 'vitest';
import { scoreSites } from '../../src/evaluation/site-scores.js';
import type { SurveyRecord } from '../../src/data/survey.js';
import type { MatrixDraws } from '../../src/uncertainty/draws.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import { pickFrom } from '../error-helpers.js';
import { everyDraw } from '../helpers.js';

// A known chain and first-survey mix, and two observers of different accuracy (row = true state, column = recorded):
// A nearly right, B often wrong. The pooled matrix is their average (what one shared matrix would hold
// when both made as many assessed calls).
const P = [[0.8, 0.15, 0.05], [0.1, 0.75, 0.15], [0.05, 0.1, 0.85]];
const EA = [[0.95, 0.04, 0.01], [0.03, 0.94, 0.03], [0.01, 0.04, 0.95]];
const EB = [[0.55, 0.35, 0.1], [0.25, 0.5, 0.25], [0.1, 0.3, 0.6]];
const POOLED = EA.map((row, i) => row.map((x, j) => (x + EB[i]![j]!) / 2));
const PI = [0.5, 0.3, 0.2];
const SITES = 40;
const YEARS = 6;
const D = 1000;
const REPLICATES = 250;

/** Draws at the known P and matrices: what is checked is the filter, the recording step and the bands, not the posterior. */
function knownDraws(perObserver: boolean): MatrixDraws {
  return {
    k: 3, count: D, source: 'point', notes: [],
    data: everyDraw(P, D),
    emissions: everyDraw(POOLED, D),
    ...(perObserver ? { observerEmissions: everyDraw([POOLED, EA, EB], D), observers: ['A', 'B'] } : {}),
  };
}

/**
 * Every site's true path from π through P, independently of the code under test; each year's
 * survey made by A or B at random, except the scored year 2005, surveyed by B (the poor observer)
 * at every site — so reading it through the pooled matrix is wrong, not just noisier.
 */
function recordedSurveys(random: RandomStream): SurveyRecord[] {
  const out: SurveyRecord[] = [];
  for (let s = 0; s < SITES; s++) {
    let x = pickFrom(random, PI);
    for (let t = 0; t < YEARS; t++) {
      if (t > 0) x = pickFrom(random, P[x]!);
      const observer = t === YEARS - 1 || random.uniform() < 0.5 ? 'B' : 'A';
      out.push({ site: `s${String(s).padStart(3, '0')}`, time: 2000 + t, state: pickFrom(random, (observer === 'A' ? EA : EB)[x]!), observer, line: 2 + s * YEARS + t });
    }
  }
  return out;
}

describe('scores on the recorded scale with one error matrix per observer are calibrated (simulation)', () => {
  it('90% bands, each survey through its observer\'s matrix, cover simulated records ~90% of the time, one and two steps ahead; the per-observer forecasts score better than through the pooled matrix', () => {
    const random = randomStreams(20261203);
    const tally = { own: 0, pooled: 0, bands: 0 };
    const gains: number[] = [];
    const [own, pooled] = [knownDraws(true), knownDraws(false)];
    for (let r = 0; r < REPLICATES; r++) {
      const records = recordedSurveys(random.stream(`replicate:${r}`));
      for (const origin of [2004, 2003]) {
        const counts = [0, 0, 0];
        for (const x of records) if (x.time === origin) counts[x.state]! += 1;
        const at = { origin, target: 2005, step: 1, originCounts: counts, level: 0.9, initial: PI };
        const a = scoreSites(own, records, at, random.stream(`bands:${r}:${origin}`))!;
        const b = scoreSites(pooled, records, at, random.stream(`bands:${r}:${origin}`))!;
        tally.own += a.covered;
        tally.pooled += b.covered;
        gains.push(b.chain.log - a.chain.log);
        tally.bands += 3;
      }
    }
    const rate = tally.own / tally.bands;
    const pooledRate = tally.pooled / tally.bands;
    const gain = gains.reduce((x, y) => x + y, 0) / gains.length;
    const se = Math.sqrt(gains.reduce((x, y) => x + (y - gain) ** 2, 0) / (gains.length - 1) / gains.length);
    console.log(`per-observer coverage ${rate.toFixed(3)}, pooled ${pooledRate.toFixed(3)} over ${tally.bands} bands; log score better by ${gain.toFixed(4)} nats/site (se ${se.toFixed(4)})`);
    // 1,500 bands: at a true rate of 0.90 the sd of the observed rate is 0.0077. Whole-number bands
    // cover at least their level, so the floor 0.877 (3 sd below 0.90; false alarm about 0.1%) is
    // one-sided; the ceiling 0.99 catches bands so wide they say nothing.
    expect(rate).toBeGreaterThan(0.877);
    expect(rate).toBeLessThan(0.99);
    // Through the pooled matrix the scored survey (by B) is read as a better observer's. Count bands
    // are forgiving (this run: pooled 0.915 beside 0.930, so nothing is asserted on them), but the
    // forecasts are worse site by site: the log score (strictly proper, Gneiting & Raftery 2007) of
    // the per-observer forecasts is lower in the mean over the 500 paired cases, by more than 3
    // standard errors of the paired difference (one-sided false alarm about 0.1%).
    expect(gain).toBeGreaterThan(3 * se);
  }, 240_000);
});
