import type { GapCell } from './counts.js';
import { addBridgeExpectations, oneStepLogLikelihood } from './bridges.js';
import { maximumLikelihood, posteriorMean, type PointEstimate } from './estimates.js';

export interface GapEstimate extends PointEstimate {
  /** Observed one-step counts plus the expected one-step transitions inside every bridge, at p. */
  readonly expected: Float64Array;
  /** Log-likelihood of every pair at p: Σ n·log pᵢⱼ over one-step pairs + Σ n·log (Pᵍ)ᵢⱼ over pairs g steps apart. */
  readonly logLikelihood: number;
  /** EM iterations taken (0 on the closed-form path). */
  readonly iterations: number;
  /** Whether the largest change of a cell fell below EM_TOLERANCE before EM_MAX_ITERATIONS. */
  readonly converged: boolean;
}

/** EM stops when no cell moves by more than this between iterations. */
export const EM_TOLERANCE = 1e-10;
/** … or after this many iterations, reported as not converged (EM is slow near a boundary maximum). */
export const EM_MAX_ITERATIONS = 20_000;

/**
 * Maximum-likelihood one-step matrix from one-step counts and counts by gap, by EM (Dempster,
 * Laird & Rubin 1977; for a chain seen at irregular times, the states between surveys are the
 * missing data, as in Baum et al. 1970). E-step: expected one-step transitions inside each bridge
 * (bridges.ts). M-step: the closed-form MLE of the completed counts, maximumLikelihood — the same
 * estimator as without gaps, so a row with no data (observed or expected) takes the prior mean and
 * is flagged, and structural zeros, zero in the start and in every E-step, stay zero. Each
 * iteration cannot lower the likelihood.
 *
 * Start: the posterior mean of the one-step counts alone, positive on every cell the user allows,
 * so that no possible transition is excluded before the data have spoken.
 *
 * With no pairs further apart than one step this is exactly the closed form (the fast path: no
 * iteration at all), which is what keeps clean-data fits and their goldens unchanged.
 */
export function gapMaximumLikelihood(counts: Float64Array, gapCounts: readonly GapCell[], alpha: Float64Array, k: number,
  start?: Float64Array, maxIterations = EM_MAX_ITERATIONS): GapEstimate {
  if (gapCounts.length === 0) {
    const closed = maximumLikelihood(counts, alpha, k);
    return { ...closed, expected: counts, logLikelihood: oneStepLogLikelihood(closed.p, counts), iterations: 0, converged: true };
  }
  let p = start ?? posteriorMean(counts, alpha, k);
  let expected = new Float64Array(k * k);
  let estimate = maximumLikelihood(counts, alpha, k);
  let iterations = 0;
  let converged = false;
  while (iterations < maxIterations) {
    expected = Float64Array.from(counts);
    addBridgeExpectations(p, k, gapCounts, expected);
    estimate = maximumLikelihood(expected, alpha, k);
    iterations += 1;
    let change = 0;
    for (let c = 0; c < k * k; c++) change = Math.max(change, Math.abs(estimate.p[c]! - p[c]!));
    p = estimate.p;
    if (change < EM_TOLERANCE) { converged = true; break; }
  }
  // The completed counts and likelihood at the final p, so that they describe the matrix reported.
  expected = Float64Array.from(counts);
  const gapPart = addBridgeExpectations(p, k, gapCounts, expected);
  const neverLeft = estimate.rowsNeverLeft;
  return {
    p, rowsFromPrior: estimate.rowsFromPrior, rowsNeverLeft: neverLeft, expected,
    logLikelihood: oneStepLogLikelihood(p, counts) + gapPart, iterations, converged,
  };
}
