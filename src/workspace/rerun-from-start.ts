import type { Fit } from '../fit/fit.js';
import type { SurveyedMix } from '../chain/latest-mix.js';
import { loadScenarios } from '../scenario/load-scenario.js';
import type { Scenario } from '../scenario/scenario.js';
import { scenarioDraws } from '../engine/scenario-draws.js';
import type { RandomStream } from '../uncertainty/random.js';
import { simulate } from '../engine/simulate.js';
import { summarise, type ForecastResult } from '../engine/forecast.js';

/**
 * The previous record's latest surveyed mix in this fit's state order, or null when it holds a
 * state this fit does not know (then the start cannot be carried over).
 */
export function carriedStart(previous: { readonly states: readonly string[]; readonly latest: SurveyedMix }, fit: Fit): SurveyedMix | null {
  const counts = new Array<number>(fit.states.length).fill(0);
  for (const [i, state] of previous.states.entries()) {
    const j = fit.states.indexOf(state);
    if (j < 0 && previous.latest.counts[i]! > 0) return null;
    if (j >= 0) counts[j] = previous.latest.counts[i]!;
  }
  return { ...previous.latest, counts, shares: counts.map((c) => c / previous.latest.sites) };
}

/**
 * This season's scenario file run with the new fit but the previous record's start: the file is
 * resolved against the new fit with its latest mix replaced by the previous record's, so
 * `start: latest`, `plots: latest`, treatment and event years all fall where they did then. On
 * the same seed and named streams as this season's run, the matrix draws are this season's, so
 * "now − this" is the effect of moving the start alone (common random numbers), and "this −
 * previous record" the effect of the new data (and of any edit to the file). The uncertainty split
 * and prior checks are not needed and are skipped.
 */
export function rerunFromStart(path: string, rel: string, fit: Fit, start: SurveyedMix, random: RandomStream): ForecastResult[] {
  const moved: Fit = { ...fit, latest: start };
  return loadScenarios(path, { fit: moved }).map((s): ForecastResult => {
    const scenario: Scenario = { ...s, file: rel };
    const matrices = scenarioDraws(scenario, scenario.draws, random.stream('matrices'));
    return summarise(scenario, matrices, simulate(scenario, matrices, random), random, { split: false, priorChecks: false });
  });
}
