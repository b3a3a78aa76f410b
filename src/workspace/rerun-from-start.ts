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
 * This fit with its latest mix replaced by the previous record's — and, for a zoned fit, each
 * zone's latest mix by that zone's in the previous record, since a stratified forecast starts each
 * zone from its own mix. The fit itself when nothing moved; null when the start cannot be carried
 * (a state this fit does not know, or the previous record's zones are not this fit's).
 */
export function movedStart(previous: Fit, fit: Fit): Fit | null {
  const start = carriedStart(previous, fit);
  if (!start) return null;
  const same = (a: SurveyedMix, b: SurveyedMix): boolean => a.time === b.time && a.sites === b.sites && a.counts.every((c, s) => c === b.counts[s]);
  if (!fit.zones) return same(start, fit.latest) ? fit : { ...fit, latest: start };
  const before = previous.zones;
  if (!before || before.zones.length !== fit.zones.zones.length) return null;
  const zones = [];
  for (const [z, zone] of fit.zones.zones.entries()) {
    const old = before.zones[z]!;
    const zoneStart = old.name === zone.name ? carriedStart(old.fit, zone.fit) : null;
    if (!zoneStart) return null;
    zones.push({ ...zone, fit: { ...zone.fit, latest: zoneStart } });
  }
  if (same(start, fit.latest) && zones.every((z, n) => same(z.fit.latest, fit.zones!.zones[n]!.fit.latest))) return fit;
  return { ...fit, latest: start, zones: { ...fit.zones, zones } };
}

/**
 * This season's scenario file run with the new fit moved to the previous record's start (movedStart): the file is
 * resolved against it, so
 * `start: latest`, `plots: latest`, treatment and event years all fall where they did then. On
 * the same seed and named streams as this season's run, the matrix draws are this season's, so
 * "now − this" is the effect of moving the start alone (common random numbers), and "this −
 * previous record" the effect of the new data (and of any edit to the file). The uncertainty split
 * and prior checks are not needed and are skipped.
 */
export function rerunFromStart(path: string, rel: string, moved: Fit, random: RandomStream): ForecastResult[] {
  return loadScenarios(path, { fit: moved }).map((s): ForecastResult => {
    const scenario: Scenario = { ...s, file: rel };
    const matrices = scenarioDraws(scenario, scenario.draws, random.stream('matrices'));
    return summarise(scenario, matrices, simulate(scenario, matrices, random), random, { split: false, priorChecks: false });
  });
}
