import type { SurveyTable } from '../data/survey.js';
import { recordsOf, selectRows } from '../data/survey-rows.js';
import { firstSurveyMix, fitSurvey, type Fit } from '../fit/fit.js';
import { DEFAULT_AUGMENT, sampleLatent } from '../uncertainty/augment.js';
import type { FitSettings } from '../fit/settings.js';
import { drawMatrices } from '../uncertainty/draw-matrices.js';
import { LIMITS } from '../limits.js';
import { SereError } from '../errors.js';
import type { RandomStream } from '../uncertainty/random.js';
import { observedMixes } from './observed.js';
import { scoreSites, summariseScores, type ScoredCase, type ScoreSummary } from './site-scores.js';

export interface HindcastCase extends ScoredCase {
  /** Survey time the forecast starts from (data up to and including it). */
  readonly origin: number;
  /** Survey time forecast and then compared with what was seen. */
  readonly target: number;
  readonly steps: number;
}

export interface HindcastSummary extends ScoreSummary {
  readonly steps: number;
}

export interface HindcastSettings {
  readonly horizons: readonly number[];
  readonly draws: number;
  readonly level: number;
  readonly random: RandomStream;
}

/**
 * Hindcast over the whole history: for every survey time T and horizon h, fit on the surveys up
 * to T − h, and score the state of every site surveyed at T from its own last survey by then —
 * the chain's posterior predictive beside persistence and climatology (site-scores.ts) — with
 * plot-count prediction bands for those sites' mix. Skill above 0 and coverage near the level say
 * how far ahead the chain can be trusted. With an error table (`settings.errors`) each origin's fit
 * is the observer-error model on the surveys up to it, and its sites are scored on the recorded
 * scale (recorded-predictive.ts).
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
  const records = recordsOf(table); // once: each origin and horizon scores from the same surveys
  for (const origin of times) {
    const past = selectRows(table, (n) => table.rows.time[n]! <= origin);
    let fit: Fit;
    try {
      fit = fitSurvey(past, settings);
    } catch (err) {
      // No transitions yet before this origin: skip it. Anything else (an error table that cannot
      // be read, say) is the user's to hear, not an origin silently left out.
      if (err instanceof SereError && err.code === 'NO_TRANSITIONS') continue;
      throw err;
    }
    // With observer error the sampler runs once per origin, on the origin's own stream, and every
    // horizon draws from it: the fit on the past, with the same error table. (With gaps alone each
    // horizon still runs its own, as before, so those seeded hindcasts keep their values.)
    if (fit.errorModel) fit = { ...fit, latentSample: sampleLatent(fit, DEFAULT_AUGMENT, options.random.stream(`hindcast:${origin}`).stream('augment')) };
    const initial = firstSurveyMix(fit);
    for (const steps of options.horizons) {
      const target = origin + steps * settings.step;
      if (!observed.has(target)) continue;
      const random = options.random.stream(`hindcast:${origin}:${steps}`);
      const matrices = drawMatrices(fit, 'posterior', options.draws, random.stream('matrices'));
      const scored = scoreSites(matrices, records,
        { origin, target, step: settings.step, originCounts: observed.get(origin)!.counts, level: options.level, ...(initial ? { initial } : {}) }, random.stream('sites'));
      if (scored) cases.push({ origin, target, steps, ...scored });
    }
  }
  const summary = options.horizons
    .map((steps) => ({ steps, list: cases.filter((c) => c.steps === steps) }))
    .filter((s) => s.list.length > 0)
    .map(({ steps, list }) => ({ steps, ...summariseScores(list, options.level) }));
  return { cases, summary, originsLeftOut: every.length - times.length };
}
