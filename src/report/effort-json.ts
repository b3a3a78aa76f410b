import type { Scenario } from '../scenario/scenario.js';
import type { SurveyEffort } from '../evaluation/survey-effort.js';
import type { ZoneEffort } from '../evaluation/zone-effort.js';
import type { ErrorSurveyEffort } from '../evaluation/survey-effort-errors.js';
import { TOOL_VERSION } from '../version.js';

/** `sere effort --json`: band widths by state, now and in every cell of the grid (README, "JSON"). */
export function effortJson(scenario: Scenario, effort: SurveyEffort | ZoneEffort | ErrorSurveyEffort, seed: number): string {
  const states = scenario.fit.states;
  // Object.fromEntries defines own properties, so a state called __proto__ is an ordinary key.
  const names = 'names' in effort ? effort.names : [];
  const byState = (w: readonly number[]): Record<string, number> => Object.fromEntries(states.map((s, i) => [s, w[i]!]));
  // NaN (one replicate: no spread to measure) is written as null.
  const errors = (e: readonly number[]): Record<string, number | null> => Object.fromEntries(states.map((s, i) => [s, Number.isNaN(e[i]!) ? null : e[i]!]));
  return JSON.stringify({
    format: 'sere-effort', format_version: 1, tool_version: TOOL_VERSION, scenario: scenario.name, seed,
    level: scenario.level, horizon_year: scenario.start.year + scenario.horizonSteps * scenario.fit.step, replicates: effort.replicates,
    current: byState(effort.current), cells: effort.cells.map((c) => ({ sites: c.sites, seasons: c.seasons, widths: byState(c.widths), change_se: errors(c.changeError),
      ...('zones' in c ? { zones: c.zones.map((p, z) => ({ name: names[z], sites: p.sites, widths: byState(p.widths), change_se: errors(p.changeError) })) } : {}) })),
    // A stratified scenario: each zone's share of the area and its own widths now (its cells' widths are in `cells[].zones`).
    ...('names' in effort ? { zones: effort.names.map((name, z) => ({ name, share: effort.shares[z], current: byState(effort.currentZones[z]!) })) } : {}),
    // With an error table: the sampler rerun for "now" and every cell and replicate.
    ...('sampler' in effort ? { sampler: { chains: effort.sampler.chains, warm_up: effort.sampler.warmUp, retained: effort.sampler.retained, thin: effort.sampler.thin } } : {}),
  }, null, 2) + '\n';
}
