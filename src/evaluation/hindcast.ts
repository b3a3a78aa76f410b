import type { SurveyTable } from '../data/survey.js';
import { selectRows } from '../data/survey-rows.js';
import { fitSurvey } from '../fit/fit.js';
import type { FitSettings } from '../fit/settings.js';
import type { Scenario } from '../scenario/scenario.js';
import { drawMatrices } from '../uncertainty/draw-matrices.js';
import { LIMITS } from '../limits.js';
import type { RandomStream } from '../uncertainty/random.js';
import { simulate } from '../engine/simulate.js';
import { summarise } from '../engine/forecast.js';
import { observedMixes } from './observed.js';
import { brierScore, covered, logScore } from './scores.js';

export interface HindcastCase {
  /** Survey time the forecast starts from (data up to and including it). */
  readonly origin: number;
  /** Survey time forecast and then compared with what was seen. */
  readonly target: number;
  readonly steps: number;
  readonly sites: number;
  /** States whose observed share fell inside the band. */
  readonly covered: number;
  readonly states: number;
  readonly logScore: number;
  readonly brierScore: number;
  /** The same scores for "nothing changes" (the origin's mix, smoothed by ½ per state). */
  readonly persistenceLogScore: number;
  readonly persistenceBrierScore: number;
}

export interface HindcastSummary {
  readonly steps: number;
  readonly cases: number;
  /** Share of (case, state) pairs inside their band: near the level when the bands are honest. */
  readonly coverage: number;
  readonly logScore: number;
  readonly brierScore: number;
  readonly persistenceLogScore: number;
  readonly persistenceBrierScore: number;
}

export interface HindcastSettings {
  readonly horizons: readonly number[];
  readonly draws: number;
  readonly level: number;
  readonly random: RandomStream;
}

/**
 * Hindcast over the whole history: for every survey time T and horizon h, fit on the surveys up
 * to T − h, forecast the mix of the plots surveyed then h steps ahead — posterior draws of the
 * matrix plus plot-level chance, so the band is a prediction band for an observed mix — and compare
 * with what was surveyed at T. Coverage near the credible level and scores better than persistence
 * say how far ahead the chain can be trusted.
 */
export function hindcast(table: SurveyTable, settings: FitSettings, options: HindcastSettings):
  { cases: HindcastCase[]; summary: HindcastSummary[]; originsLeftOut: number } {
  const k = table.states.length;
  const observed = observedMixes(table.rows, k);
  const every = [...observed.keys()];
  // Each origin refits the chain on the surveys before it: a long series (thousands of survey
  // times) is hindcast from its most recent origins only, which is where the trust matters.
  const times = every.slice(-LIMITS.hindcastOrigins);
  const cases: HindcastCase[] = [];
  for (const origin of times) {
    const past = selectRows(table, (n) => table.rows.time[n]! <= origin);
    let fit;
    try {
      fit = fitSurvey(past, settings);
    } catch {
      continue; // no transitions yet before this origin
    }
    const start = observed.get(origin)!;
    for (const steps of options.horizons) {
      const at = observed.get(origin + steps * settings.step);
      if (!at) continue;
      const shares = Float64Array.from(start.counts, (c) => c / start.sites);
      const scenario: Scenario = {
        name: `hindcast ${origin}+${steps}`, file: table.file, sha256: table.sha256, fit, source: 'posterior',
        draws: options.draws, start: { year: origin, shares, from: 'given' }, horizonSteps: steps, showSteps: [0, steps],
        level: options.level, treatments: [], events: [], plots: { total: start.sites, start: start.counts },
      };
      const random = options.random.stream(`hindcast:${origin}:${steps}`);
      const matrices = drawMatrices(fit, 'posterior', options.draws, random.stream('matrices'));
      const result = summarise(scenario, matrices, simulate(scenario, matrices, random, {}, undefined, [0, steps]), random, { split: false, priorChecks: false });
      const last = result.steps.length - 1;
      const predicted = result.shares.map((b) => b.mean[last]!);
      const seen = at.counts.map((c) => c / at.sites);
      const low = result.plots!.map((b) => b.low[last]! / start.sites);
      const high = result.plots!.map((b) => b.high[last]! / start.sites);
      const persistence = start.counts.map((c) => (c + 0.5) / (start.sites + 0.5 * k));
      cases.push({
        origin, target: at.time, steps, sites: at.sites, covered: covered(seen, low, high), states: k,
        logScore: logScore(predicted, at.counts), brierScore: brierScore(predicted, at.counts),
        persistenceLogScore: logScore(persistence, at.counts), persistenceBrierScore: brierScore(persistence, at.counts),
      });
    }
  }
  const summary = options.horizons.map((steps) => {
    const mine = cases.filter((c) => c.steps === steps);
    const mean = (f: (c: HindcastCase) => number): number => mine.reduce((a, c) => a + f(c), 0) / mine.length;
    return {
      steps, cases: mine.length,
      coverage: mine.reduce((a, c) => a + c.covered, 0) / mine.reduce((a, c) => a + c.states, 0),
      logScore: mean((c) => c.logScore), brierScore: mean((c) => c.brierScore),
      persistenceLogScore: mean((c) => c.persistenceLogScore), persistenceBrierScore: mean((c) => c.persistenceBrierScore),
    };
  }).filter((s) => s.cases > 0);
  return { cases, summary, originsLeftOut: every.length - times.length };
}
