import { SereError, type Place } from '../errors.js';
import type { KeyPath } from '../data/read-structured.js';
import type { ScenarioFile } from './schema.js';
import type { LandscapeTarget } from './scenario.js';

export interface TargetContext {
  readonly step: number;
  readonly horizonSteps: number;
  readonly stateIndex: (name: string, path: KeyPath) => number;
  readonly locate: (path: KeyPath) => Place;
}

/**
 * Resolve a scenario's target against the fit. The shape (exactly one of state / states, exactly
 * one of share / at_least / at_most, bounds in [0, 1]) is the schema's; here: every state known,
 * none listed twice, and stays_met a whole number of steps that fits within the horizon (a run
 * longer than the forecast could never be seen, so the target could never count as reached).
 */
export function resolveTarget(target: NonNullable<ScenarioFile['target']>, ctx: TargetContext): LandscapeTarget {
  const fail = (what: string, path: KeyPath, hint: string): never => {
    throw new SereError('BAD_SCENARIO', what, ctx.locate(['target', ...path]), hint);
  };
  const states = target.states !== undefined
    ? target.states.map((name, n) => ctx.stateIndex(name, ['target', 'states', n]))
    : [ctx.stateIndex(target.state!, ['target', 'state'])];
  states.forEach((s, n) => {
    const earlier = states.indexOf(s);
    if (earlier < n) fail(`state '${target.states![n]}' is listed twice in target.states`, ['states', n], 'list each state once');
  });
  const bound = target.at_most !== undefined ? 'at-most' as const : 'at-least' as const;
  const threshold = target.at_most ?? target.at_least ?? target.share!;
  let staysMet = 1;
  if (target.stays_met !== undefined) {
    const years = target.stays_met;
    if (years % ctx.step !== 0) fail(`stays_met of ${years} years is not a whole number of ${ctx.step}-year steps`, ['stays_met'], `use a multiple of ${ctx.step}`);
    staysMet = years / ctx.step;
    // Steps 0 … horizon are horizon + 1 years of shares: the longest run the forecast can show.
    if (staysMet > ctx.horizonSteps + 1) {
      fail(`stays_met of ${years} years is longer than the forecast (${(ctx.horizonSteps + 1) * ctx.step} years of shares)`, ['stays_met'],
        'shorten stays_met or extend the horizon');
    }
  }
  return { states, bound, threshold, staysMet };
}
