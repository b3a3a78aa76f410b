import { SereError } from '../errors.js';
import { formatBytes, LIMITS } from '../limits.js';
import type { Scenario } from '../scenario/scenario.js';
import { CHUNK_BYTES } from './chunk-years.js';
import { buildPlan } from './plan.js';
import { blockCount } from '../uncertainty/draw-blocks.js';

/**
 * Bytes a run of these scenarios (alternatives sharing one set of draws, run side by side) is
 * about to hold. Years are summarised a chunk at a time (simulate.ts), so what grows with the run
 * is per draw, not per draw and year:
 * - the matrix draws, D × k² doubles, and the stationary mixes worked out from them (up to three
 *   D × k sets: fitted, without never-surveyed rows, treated);
 * - per scenario, each draw's current mix in every sub-population (D × G × k doubles), its
 *   first-time tracking (D × (k + 3) 32-bit numbers), its mix at the horizon (D × k doubles), and
 *   the years of each landscape event (D × (H + 1) bytes);
 * - the chunk of years, CHUNK_BYTES, or one year of every scenario when that is more;
 * - plot counts, when asked: D × (recorded years) × k 32-bit numbers (whole-horizon, for now);
 * - once more one scenario's run state, for the uncertainty split's reruns;
 * - with year-to-year variation, each draw's concentrations (D × k doubles) and the keys of the
 *   year streams (32 bytes per block of draws and step).
 * An estimate for refusing a run before allocating, not an exact account.
 */
function plannedBytes(scenarios: readonly Scenario[]): number {
  const first = scenarios[0]!;
  const k = first.fit.states.length;
  const D = first.draws;
  const steps = first.horizonSteps + 1;
  const perScenario = scenarios.map((s) => {
    const plan = buildPlan(s);
    return D * (plan.subPopulations.length * k * 8 + (k + 3) * 4 + k * 8 + plan.landscapeEvents.length * steps)
      + (s.plots ? D * steps * k * 4 : 0);
  });
  const chunk = Math.max(CHUNK_BYTES, D * k * 8 * scenarios.length);
  const variation = first.variation.kind === 'none' ? 0 : D * k * 8 + blockCount(D) * steps * 32;
  return D * k * k * 8 + 3 * D * k * 8 + perScenario.reduce((a, b) => a + b, 0) + chunk + Math.max(...perScenario) + variation;
}

/** Refuse, with the estimate and what to change, a run that would hold more than the memory limit. */
export function checkRunSize(scenarios: readonly Scenario[]): void {
  const bytes = plannedBytes(scenarios);
  if (bytes > LIMITS.memoryBytes) {
    const first = scenarios[0]!;
    throw new SereError('TOO_LARGE',
      `this run would hold about ${formatBytes(bytes)} (${first.draws} draws × ${first.horizonSteps + 1} years × ` +
      `${first.fit.states.length} states${scenarios.length > 1 ? ` × ${scenarios.length} alternatives` : ''}); the limit is ${formatBytes(LIMITS.memoryBytes)}`,
      { file: first.file, path: 'uncertainty.draws' }, 'use fewer draws (uncertainty.draws or --draws), a shorter horizon or fewer plots and events');
  }
}
