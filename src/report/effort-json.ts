import type { Scenario } from '../scenario/scenario.js';
import type { SurveyEffort } from '../evaluation/survey-effort.js';
import { TOOL_VERSION } from '../version.js';

/** `sere effort --json`: band widths by state, now and in every cell of the grid (README, "JSON"). */
export function effortJson(scenario: Scenario, effort: SurveyEffort, seed: number): string {
  const states = scenario.fit.states;
  // Object.fromEntries defines own properties, so a state called __proto__ is an ordinary key.
  const byState = (w: readonly number[]): Record<string, number> => Object.fromEntries(states.map((s, i) => [s, w[i]!]));
  return JSON.stringify({
    format: 'sere-effort', format_version: 1, tool_version: TOOL_VERSION, scenario: scenario.name, seed,
    level: scenario.level, horizon_year: scenario.start.year + scenario.horizonSteps * scenario.fit.step, replicates: effort.replicates,
    current: byState(effort.current), cells: effort.cells.map((c) => ({ sites: c.sites, seasons: c.seasons, widths: byState(c.widths) })),
  }, null, 2) + '\n';
}
