import { SereError } from '../errors.js';
import { formatBytes, LIMITS } from '../limits.js';
import type { Scenario } from '../scenario/scenario.js';

/**
 * Bytes a run of these scenarios (alternatives sharing one set of draws) is about to hold: the
 * matrix draws (D × k × k doubles), each alternative's shares at every step (D × (H + 1) × k
 * doubles, plus 32-bit plot counts when asked), twice over for the uncertainty split's reruns.
 * An estimate for refusing a run before allocating, not an exact account.
 */
export function plannedBytes(scenarios: readonly Scenario[]): number {
  const first = scenarios[0]!;
  const k = first.fit.states.length;
  const D = first.draws;
  const perValue = 8 + (first.plots ? 4 : 0);
  return D * k * k * 8 + 2 * scenarios.length * D * (first.horizonSteps + 1) * k * perValue;
}

/** Refuse, with the estimate and what to change, a run that would hold more than the memory limit. */
export function checkRunSize(scenarios: readonly Scenario[]): void {
  const bytes = plannedBytes(scenarios);
  if (bytes > LIMITS.memoryBytes) {
    const first = scenarios[0]!;
    throw new SereError('TOO_LARGE',
      `this run would hold about ${formatBytes(bytes)} (${first.draws} draws × ${first.horizonSteps + 1} years × ` +
      `${first.fit.states.length} states${scenarios.length > 1 ? ` × ${scenarios.length} alternatives` : ''}); the limit is ${formatBytes(LIMITS.memoryBytes)}`,
      { file: first.file, path: 'uncertainty.draws' }, 'use fewer draws (uncertainty.draws or --draws) or a shorter horizon');
  }
}
