import { posteriorSummary, type PosteriorSummary } from '../chain/estimates.js';
import type { GapEstimate } from '../chain/gap-em.js';
import { mixturePosteriorSummary } from '../chain/mixture-summary.js';
import { stationaryMix, type StationaryResult } from '../chain/stationary.js';
import { fitMle, fitPrior, type Fit } from './fit.js';

export interface FitEstimates {
  /** The MLE, with how it was found (closed form, or EM with gaps) and the completed counts. */
  readonly mle: GapEstimate;
  readonly posterior: PosteriorSummary;
  /** Stationary mix of the MLE, or the closed classes when there is more than one. */
  readonly stationary: StationaryResult;
}

export function estimateFit(fit: Fit, level: number): FitEstimates {
  const k = fit.states.length;
  const alpha = fitPrior(fit);
  const mle = fitMle(fit);
  // With observer error the recorded transitions are not data on P: the sweeps hold every true one.
  const counts = fit.errorModel ? new Float64Array(k * k) : fit.counts;
  return {
    mle,
    // With gaps and the sampler's sweeps at hand: the exact mixture; otherwise the closed form of the one-step counts.
    posterior: fit.latentSample
      ? mixturePosteriorSummary(counts, alpha, k, level, fit.latentSample.latent, fit.latentSample.retained)
      : posteriorSummary(fit.counts, alpha, k, level),
    stationary: stationaryMix(mle.p, k),
  };
}
