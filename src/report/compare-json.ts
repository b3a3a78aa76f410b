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
    // 2: dominance_difference reports four outcomes (both, only one, neither) instead of sooner/same/later.
    // 3: the target keys of sere-forecast format 2; years is null when both_draws is under 50.
    format_version: 3,
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
          both: { sooner: a.dominance.outcomes.sooner, same: a.dominance.outcomes.same, later: a.dominance.outcomes.later },
          only_alternative: a.dominance.outcomes.onlyAlternative,
          only_baseline: a.dominance.outcomes.onlyBaseline,
          neither: a.dominance.outcomes.neither,
          both_draws: a.dominance.bothDraws,
          years: a.dominance.years,
        }
        : null,
    })),
  };
}
