import { describe, expect, it } from 'vitest';
import { projectMix, quantile7 } from '../helpers.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { bootstrapDraws, BOOTSTRAP_FEW_SITES } from '../../src/uncertainty/bootstrap.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import type { SurveyRecord } from '../../src/data/survey.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import type { MatrixDraws } from '../../src/uncertainty/draws.js';
import { FIRST_SURVEY_MIX, TRUE_MATRIX } from '../../scenarios/brenhollow/generate.js';

const K = 5;
const H = 10;
const DRAWS = 400;
const P = TRUE_MATRIX.flat();

/** Share of (history, state) pairs whose true 10-step mix lies inside the 90% band of each method. */
/** A site's first state: uniform over the states, or drawn from a given mix. */
type FirstState = (r: RandomStream) => number;
const uniformStart: FirstState = (r) => r.integer(K);
const fromMix = (mix: readonly number[]): FirstState => (r) => {
  let u = r.uniform();
  let s = 0;
  while (s < mix.length - 1 && (u -= mix[s]!) >= 0) s += 1;
  return s;
};

function coverage(sites: number, histories: number, random: RandomStream, firstState: FirstState = uniformStart): { bootstrap: number; posterior: number } {
  let inBoot = 0;
  let inPost = 0;
  let cases = 0;
  for (let h = 0; h < histories; h++) {
    const r = random.stream(`history:${h}`);
    const records: SurveyRecord[] = [];
    for (let s = 0; s < sites; s++) {
      let state = firstState(r);
      for (let t = 0; t < 4; t++) {
        records.push({ site: `s${String(s).padStart(3, '0')}`, time: 2000 + t, state, line: records.length + 2 });
        let u = r.uniform();
        let next = 0;
        while (next < K - 1 && (u -= P[state * K + next]!) >= 0) next += 1;
        state = next;
      }
    }
    const fit = fitSurvey(tableFromRecords('sim', ['a', 'b', 'c', 'd', 'e'], records), DEFAULT_FIT_SETTINGS);
    const start = fit.latest.shares;
    const truth = projectMix(P, 0, start, H);
    const inside = (draws: MatrixDraws): number => {
      const mixes = Array.from({ length: DRAWS }, (_, d) => projectMix(draws.data, d * K * K, start, H));
      let n = 0;
      for (let s = 0; s < K; s++) {
        const column = mixes.map((m) => m[s]!);
        if (truth[s]! >= quantile7(column, 0.05) && truth[s]! <= quantile7(column, 0.95)) n += 1;
      }
      return n;
    };
    inBoot += inside(bootstrapDraws(fit, DRAWS, r.stream('bootstrap')));
    inPost += inside(posteriorDraws(fit, DRAWS, r.stream('posterior')));
    cases += K;
  }
  return { bootstrap: inBoot / cases, posterior: inPost / cases };
}

describe('site bootstrap coverage with few sites (the figures behind its warning)', () => {
  it(`under-covers well below ${BOOTSTRAP_FEW_SITES} sites and nears the posterior above it`, () => {
    // Sites start uniformly over the states (every row well seen). 150 histories × 5 states per
    // size; histories are independent, states within one are not, so
    // the Monte Carlo standard error is roughly 0.02–0.03. Figures seen with this seed: 12 sites
    // bootstrap 0.61 (posterior 0.89); 60 sites 0.86 (0.88).
    const random = randomStreams(1993);
    const few = coverage(12, 150, random.stream('12'));
    const many = coverage(60, 150, random.stream('60'));
    expect(few.bootstrap).toBeLessThan(0.72);
    expect(few.posterior).toBeGreaterThan(0.8);
    expect(many.bootstrap).toBeGreaterThan(0.8);
    expect(many.bootstrap).toBeLessThan(0.95);
    expect(many.posterior - many.bootstrap).toBeLessThan(0.08);
  });

  it(`notes the caution below ${BOOTSTRAP_FEW_SITES} sites, and not at or above it`, () => {
    const fitOf = (sites: number) => fitSurvey(tableFromRecords('f', ['a', 'b'],
      Array.from({ length: sites * 2 }, (_, n) => ({ site: `s${Math.floor(n / 2)}`, time: n % 2, state: (n * 7) % 3 === 0 ? 1 : 0, line: n + 2 }))),
    DEFAULT_FIT_SETTINGS);
    expect(bootstrapDraws(fitOf(BOOTSTRAP_FEW_SITES - 1), 10, randomStreams(1)).notes.some((n) => n.includes('site bootstrap rests on only'))).toBe(true);
    expect(bootstrapDraws(fitOf(BOOTSTRAP_FEW_SITES), 10, randomStreams(1)).notes.some((n) => n.includes('site bootstrap rests on only'))).toBe(false);
  });

  it('both under-cover when most sites start in one state: rarely left rows rest on the prior', () => {
    // Sites starting from the demo's first-survey mix (half mudflat, 3% rank-grass) leave the
    // high-marsh and rank-grass rows with few transitions, so their 0.5 pseudo-counts — also on
    // the true matrix's zero cells, which this fit does not declare impossible — pull the bands
    // off the truth. Seen with this seed at 40 sites: posterior 0.73, bootstrap 0.78 (an independent
    // numpy audit: 0.73 and 0.78 over 1,000 histories).
    const skewed = coverage(40, 150, randomStreams(2007).stream('skewed'), fromMix(FIRST_SURVEY_MIX));
    expect(skewed.posterior).toBeLessThan(0.82);
    expect(skewed.bootstrap).toBeLessThan(0.85);
  });
});
