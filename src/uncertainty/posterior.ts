import type { Fit } from '../fit/fit.js';
import { trueShares } from '../chain/latest-mix.js';
import { fitPrior, needsSampler } from '../fit/fit.js';
import type { LatentSample } from '../fit/latent-sample.js';
import { DEFAULT_AUGMENT, sampleLatent } from './augment.js';
import { sampleDirichlet } from './dirichlet.js';
import type { MatrixDraws } from './draws.js';
import type { RandomStream } from './random.js';

/**
 * Posterior draws of the transition matrix: each from-row independently from
 * Dirichlet(nᵢ + αᵢ), the conjugate update of a Dirichlet prior by multinomial counts (Gelman et
 * al. 2013, BDA3 sec. 3.4; for transition matrices, e.g. Lee, Judge & Zellner 1970). A row with
 * no data is drawn from the prior alone; structural zeros stay zero in every draw.
 *
 * With pairs further apart than one step, the counts are completed: each draw picks one retained
 * sweep of the data-augmentation sampler (augment.ts) at random and draws every row from
 * Dirichlet(αᵢ + observed nᵢ + latent nᵢ of that sweep). Drawing P given the completed counts
 * exactly, rather than keeping the sampler's own P, is the Rao–Blackwellised form (Gelfand & Smith
 * 1990): the draws follow the posterior mixture over the retained sweeps. Without gaps no sweep is
 * picked and no random number is spent on it: the draws are those of the closed form, unchanged.
 */
export function posteriorDraws(fit: Fit, count: number, random: RandomStream,
  latent: LatentSample | undefined = latentSampleOf(fit, random)): MatrixDraws {
  const k = fit.states.length;
  const alpha = fitPrior(fit);
  // With observer error nothing is observed exactly: every transition is in the sweep's true paths.
  if (!fit.errorModel) for (let c = 0; c < k * k; c++) if (alpha[c]! > 0) alpha[c] += fit.counts[c]!;
  const data = new Float64Array(count * k * k);
  const completed = latent ? new Float64Array(k * k) : alpha;
  const errors = latent?.errors;
  const starts = errors ? new Float64Array(count * k) : undefined;
  const emissions = errors ? new Float64Array(count * k * k) : undefined;
  // With one error matrix per observer, each draw keeps every observer's matrix of the same sweep
  // too (no random number is spent on them: draws without observers are unchanged).
  const observers = errors?.observers && fit.errorModel?.observers ? fit.errorModel.observers.names : undefined;
  const m = observers ? 1 + observers.length : 0;
  const observerEmissions = observers ? new Float64Array(count * m * k * k) : undefined;
  for (let d = 0; d < count; d++) {
    if (latent) {
      const r = random.integer(latent.retained);
      for (let c = 0; c < k * k; c++) completed[c] = alpha[c]! > 0 ? alpha[c]! + latent.latent[r * k * k + c]! : 0;
      // The true mix at the latest time of the same sweep: the draw's start (engine/carried-start.ts).
      if (errors && starts) trueShares(errors.latest, r, k, starts, d * k);
      // …and its error matrix, so plots "as recorded" see the E that goes with this P and start.
      if (errors && emissions) emissions.set(errors.emissions.subarray(r * k * k, (r + 1) * k * k), d * k * k);
      if (errors?.observers && observerEmissions) {
        observerEmissions.set(errors.emissions.subarray(r * k * k, (r + 1) * k * k), d * m * k * k);
        observerEmissions.set(errors.observers.emissions.subarray(r * (m - 1) * k * k, (r + 1) * (m - 1) * k * k), (d * m + 1) * k * k);
      }
    }
    for (let i = 0; i < k; i++) sampleDirichlet(random, completed, i * k, k, data, d * k * k + i * k);
  }
  return { k, count, data, source: 'posterior', notes: [], ...(starts ? { starts } : {}), ...(emissions ? { emissions } : {}),
    ...(observerEmissions ? { observerEmissions, observers } : {}) };
}

const sampled = new WeakMap<Fit, Map<string, LatentSample>>();

/**
 * The retained latent counts of a fit with gaps: those it carries (made at fit time), else a run
 * of the sampler on `random.stream('augment')`, made once per fit and stream. Undefined without gaps.
 */
export function latentSampleOf(fit: Fit, random: RandomStream): LatentSample | undefined {
  if (!needsSampler(fit)) return undefined;
  if (fit.latentSample) return fit.latentSample;
  let bySeed = sampled.get(fit);
  if (!bySeed) sampled.set(fit, bySeed = new Map());
  const key = `${random.seed}:${random.name}`;
  let sample = bySeed.get(key);
  if (!sample) bySeed.set(key, sample = sampleLatent(fit, DEFAULT_AUGMENT, random.stream('augment')));
  return sample;
}
