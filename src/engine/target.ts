import type { LandscapeTarget } from '../scenario/scenario.js';

/**
 * A summed share within this of the threshold counts as on it. Given starting shares are accepted
 * when they sum to 1 within 1e-9 (SHARES_SUM_TOLERANCE) and the engine never renormalises, so a
 * summed share can sit that far from its exact value: without this, `at_most: 1` over every state
 * could fail at the start by a rounding error.
 */
export const TARGET_TOLERANCE = 1e-9;

/** Whether the target is met by a mix of the whole area (shares by state). The one owner of the rule. */
export function targetMet(target: LandscapeTarget, members: ArrayLike<number>, mix: ArrayLike<number>): boolean {
  let sum = 0;
  for (let n = 0; n < members.length; n++) sum += mix[members[n]!]!;
  return target.bound === 'at-least' ? sum >= target.threshold - TARGET_TOLERANCE : sum <= target.threshold + TARGET_TOLERANCE;
}
