import type { LandscapeTarget } from '../scenario/scenario.js';

/**
 * A summed share within this of the threshold counts as on it. Given starting shares are accepted
 * when they sum to 1 within 1e-9 (SHARES_SUM_TOLERANCE) and the engine never renormalises, so a
 * summed share can sit that far from its exact value: without this, `at_most: 1` over every state
 * could fail at the start by a rounding error.
 */
export const TARGET_TOLERANCE = 1e-9;

/**
 * The target is met exactly when the summed share of its states lies in [low, high]: the one owner
 * of the rule. As two numbers so the hot loop (propagate.ts) can test it inline, without a call
 * per draw and step (a call there cost half again the time of the whole propagation, measured).
 */
export function targetBounds(target: LandscapeTarget): { readonly low: number; readonly high: number } {
  return target.bound === 'at-least'
    ? { low: target.threshold - TARGET_TOLERANCE, high: Infinity }
    : { low: -Infinity, high: target.threshold + TARGET_TOLERANCE };
}

/** Whether a mix of the whole area (shares by state) meets the target. */
export function targetMet(target: LandscapeTarget, mix: ArrayLike<number>): boolean {
  const { low, high } = targetBounds(target);
  let sum = 0;
  for (const s of target.states) sum += mix[s]!;
  return sum >= low && sum <= high;
}
