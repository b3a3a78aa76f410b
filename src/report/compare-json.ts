import type { Comparison } from '../engine/compare.js';
import { TOOL_VERSION } from '../version.js';
import { scenarioJson } from './forecast-json.js';

/**
 * The documented JSON of `sere compare --json`: the baseline and each alternative in the same
 * shape as `sere forecast --json`, plus, per alternative, the differences from the baseline by
 * state and year, the odds of giving more, and the landscape target compared.
 */
export function comparisonJson(c: Comparison): object {
  const states = c.baseline.scenario.fit.states;
  const byState = <T>(f: (s: number) => T): Record<string, T> => Object.fromEntries(states.map((name, s) => [name, f(s)]));
  return {
    format: 'sere-comparison',
    format_version: 1,
    tool_version: TOOL_VERSION,
    common_random_numbers: true,
    baseline: scenarioJson(c.baseline),
    difference_years: c.baseline.scenario.showSteps.map((t) => c.baseline.years[c.baseline.steps.indexOf(t)]),
    alternatives: c.alternatives.map((a) => ({
      ...scenarioJson(a.result),
      difference: byState((s) => a.difference[s]),
      odds: byState((s) => ({
        more: a.odds[s]!.map((o) => o.more),
        tie: a.odds[s]!.map((o) => o.tie),
        less: a.odds[s]!.map((o) => o.less),
      })),
      dominance_difference: a.dominance
        ? {
          probability: a.dominance.probabilityDifference,
          sooner: a.dominance.timing.sooner,
          same: a.dominance.timing.same,
          later: a.dominance.timing.later,
          years: a.dominance.years,
        }
        : null,
    })),
  };
}
