import { SereError } from '../errors.js';
import { fitMle } from '../fit/fit.js';
import type { Scenario } from '../scenario/scenario.js';
import { checkRunSize } from './run-size.js';
import { buildPlan, type RunPlan } from './plan.js';
import { fillPlanMatrices, planWorkspace } from './plan-matrices.js';

/**
 * Check the treatments once, on the fitted (MLE) matrix, before any draw: a factor that pushes a
 * probability above 1, or a change with nothing left in the row to rescale, is the user's error
 * and is reported at the treatment's place. Individual draws that stray are capped and counted.
 */
function checkTreatmentsOnEstimate(scenario: Scenario, plan: RunPlan): void {
  if (plan.trivial || plan.treatments.length === 0) return;
  const { p } = fitMle(scenario.fit);
  fillPlanMatrices(plan, p, 0, planWorkspace(plan), (treatment, outcome) => {
    const t = plan.treatments[treatment]!;
    const state = scenario.fit.states[t.row];
    throw outcome === 'capped'
      ? new SereError('BAD_SCENARIO', `treatment '${t.name}' pushes probabilities out of '${state}' above 1 on the fitted matrix`,
        t.place, 'use a smaller factor or value (sere fit shows the fitted probabilities)')
      : new SereError('BAD_SCENARIO', `treatment '${t.name}' cannot be met: nothing else out of '${state}' is left to rescale`,
        t.place, `every other transition out of '${state}' is zero on the fitted matrix; use move, or set values summing to 1`);
  });
}

/**
 * Check a run before it starts: its planned memory (alternatives sharing draws count together), and
 * every scenario's treatments on the fitted matrix. Every run calls this once, before any draw.
 */
export function checkScenarios(scenarios: readonly Scenario[]): void {
  if (scenarios.length > 0) checkRunSize(scenarios);
  for (const scenario of scenarios) {
    if (checked.has(scenario)) continue;
    checkTreatmentsOnEstimate(scenario, buildPlan(scenario));
    checked.add(scenario);
  }
}

/**
 * Scenarios already checked: the door (CLI, season) checks every file before anything runs, so a
 * typo in the last file costs nothing, and the engine's entry points check again for callers that
 * skipped the door — the same scenario object is worked out once. (Scenarios are never changed
 * after loading; a changed copy is a new object and is checked afresh.)
 */
const checked = new WeakSet<Scenario>();
