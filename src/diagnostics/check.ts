import type { Fit } from '../fit/fit.js';
import { posteriorDraws } from '../uncertainty/posterior.js';
import type { RandomStream } from '../uncertainty/random.js';
import { assumptionTests, type AssumptionTests } from './assumption-tests.js';
import { chainProperties, type ChainProperties } from './chain-properties.js';
import { variationCheck, type RowVariationCheck } from './variation-check.js';

export interface CheckSettings {
  readonly level: number;
  readonly draws: number;
  readonly replicates: number;
  readonly simulateAll: boolean;
  readonly periodGroups?: readonly (readonly [number, number])[];
  /** Sensitivity of a target's share this many steps ahead of the latest survey. */
  readonly target?: { readonly state: number; readonly steps: number };
}

export interface CheckResult {
  readonly fit: Fit;
  readonly settings: CheckSettings;
  readonly seed: number;
  readonly tests: AssumptionTests;
  readonly properties: ChainProperties;
  /** Per state, how alike the years are (κ); null with fewer than three survey periods. */
  readonly variation: RowVariationCheck[] | null;
}

/**
 * Everything `sere check` reports: tests of the Markov assumptions and the fitted chain's
 * properties with bands from posterior draws. The bootstrap p-values use their own named stream,
 * so adding draws does not change them.
 */
export function checkChain(fit: Fit, settings: CheckSettings, random: RandomStream): CheckResult {
  const draws = posteriorDraws(fit, settings.draws, random.stream('matrices'));
  const tests = assumptionTests(fit, {
    random: random.stream('bootstrap-p-values'),
    replicates: settings.replicates,
    simulateAll: settings.simulateAll,
    periodGroups: settings.periodGroups,
  });
  return {
    fit, settings, seed: random.seed, tests, properties: chainProperties(fit, draws, settings.level, settings.target),
    variation: variationCheck(fit, settings.level, random.stream('variation')),
  };
}
