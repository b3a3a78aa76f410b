import { posteriorMean } from '../chain/estimates.js';
import { rowsRestingOnPrior, type PriorReliance } from '../chain/prior-reliance.js';
import { stationaryMix } from '../chain/stationary.js';
import { fitMle, fitPrior, type Fit } from '../fit/fit.js';
import type { RandomStream } from '../uncertainty/random.js';
import type { Scenario } from '../scenario/scenario.js';
import { simulate } from './simulate.js';

/** The priors compared: a weak one, Jeffreys (1946) and uniform (Bayes–Laplace). */
export const SENSITIVITY_PRIORS = [0.1, 0.5, 1] as const;

export interface PriorSensitivity {
  /** The row that rests on the prior (under the fit's own prior), and why. */
  readonly reliance: PriorReliance;
  /** Share of that state at the horizon under each of SENSITIVITY_PRIORS. */
  readonly horizon: readonly number[];
  /** Its long-run share under each prior; null where the chain has no unique long-run mix. */
  readonly longRun: readonly (number | null)[];
}

/**
 * For each row that rests mostly on the prior (chain/prior-reliance.ts), that state's share at the
 * horizon and in the long run under each of SENSITIVITY_PRIORS, so a reader sees which part of a
 * forecast is data and which is assumption. Computed from the posterior mean matrix under each
 * prior, (n + α) / Σ (n + α) (Gelman et al. 2013, §3.4) — no sampling, so the three numbers differ
 * only by the prior. The horizon share runs the scenario's own start, treatments and events, with
 * landscape events at their expected effect each year; the long-run share is of the fitted chain
 * alone, as the long-run mix of a forecast is.
 */
export function priorSensitivity(scenario: Scenario, random: RandomStream): PriorSensitivity[] {
  const { fit } = scenario;
  const k = fit.states.length;
  const counts = evidenceCounts(fit);
  const flagged = rowsRestingOnPrior(counts, fitPrior(fit), k);
  if (flagged.length === 0) return [];
  const runs = SENSITIVITY_PRIORS.map((prior) => {
    const withPrior: Fit = { ...fit, prior };
    const mean = posteriorMean(counts, fitPrior(withPrior), k);
    // A stratified forecast runs the pooled fit's mean matrix in every zone: the prior is the pooled fit's.
    const Z = scenario.zones?.names.length ?? 1;
    const data = Z === 1 ? mean : Float64Array.from({ length: Z * k * k }, (_, c) => mean[c % (k * k)]!);
    const sim = simulate({ ...scenario, fit: withPrior, plots: undefined },
      { k, count: 1, data, source: 'point', notes: [], ...(scenario.zones ? { zones: Z } : {}) }, random,
      { switches: { expectedEvents: true, noPlots: true }, record: [scenario.horizonSteps] });
    const stationary = stationaryMix(mean, k);
    const horizon = Array.from(sim.horizonShares); // one draw: [s*1 + 0]
    return { horizon, longRun: stationary.unique ? stationary.mix : null };
  });
  return flagged.map((reliance) => ({
    reliance,
    horizon: runs.map((r) => r.horizon[reliance.state]!),
    longRun: runs.map((r) => (r.longRun ? r.longRun[reliance.state]! : null)),
  }));
}

/** A state's long-run share under each of SENSITIVITY_PRIORS, for `sere fit` (no scenario, so no horizon). */
export function longRunUnderPriors(fit: Fit): { readonly reliance: PriorReliance; readonly longRun: readonly (number | null)[] }[] {
  const k = fit.states.length;
  const counts = evidenceCounts(fit);
  const flagged = rowsRestingOnPrior(counts, fitPrior(fit), k);
  const mixes = SENSITIVITY_PRIORS.map((prior) => {
    const s = stationaryMix(posteriorMean(counts, fitPrior({ ...fit, prior }), k), k);
    return s.unique ? s.mix : null;
  });
  return flagged.map((reliance) => ({ reliance, longRun: mixes.map((m) => (m ? m[reliance.state]! : null)) }));
}

/**
 * The transitions a row's evidence is counted in. With observer error the chain is of the true
 * states, and the recorded counts are not its evidence: the true transitions expected at the MLE
 * (EM's completed counts, fitMle(fit).expected) stand for them — whole sites' paths, fractional.
 * Otherwise the one-step counts, as before.
 */
function evidenceCounts(fit: Fit): Float64Array {
  return fit.errorModel ? fitMle(fit).expected : fit.counts;
}
