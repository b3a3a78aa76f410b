import { fitPrior, type Fit } from '../fit/fit.js';
import type { LatentSample } from '../fit/latent-sample.js';
import { runChains, type AugmentSettings } from './chain-runner.js';
import { ESS_WARNING, RHAT_WARNING } from './mcmc-diagnostics.js';
import type { RandomStream } from './random.js';
import { augmentErrors } from './augment-errors.js';

export type { AugmentSettings } from './chain-runner.js';

/**
 * 4 chains × (500 dropped + 250 kept, every second sweep): 1,000 retained completed-count matrices.
 * Measured on the bench case (`npm run bench -- gaps`: 10,000 sites, 30% of visits missed, where
 * the latent paths are a large part of the data and the sampler mixes slowest), keeping every sweep
 * after 250 gave a smallest bulk ESS of 380 and a largest R̂ of 1.011 — just short of the
 * thresholds; see README for the figures with these settings.
 */
export const DEFAULT_AUGMENT: AugmentSettings = { chains: 4, warmUp: 500, retained: 1000, thin: 2 };

/**
 * The posterior of P with pairs further apart than one step, by data augmentation (Tanner & Wong
 * 1987): alternate (latent paths | P), drawn bridge cell by bridge cell (bridge-sampler.ts), and
 * (P | completed counts), each row from Dirichlet(prior + observed + latent one-step counts) — the
 * conjugate update the closed-form posterior already uses (gap-kernel.ts).
 *
 * Each chain c runs on `random.stream('chain:c')` and starts from a draw of the posterior given the
 * one-step counts alone (more spread than the target, as R̂ wants). Same seed → same retained
 * sweeps, on any number of `threads` (chain-runner.ts).
 */
export function augment(fit: Fit, settings: AugmentSettings, random: RandomStream, threads?: number): LatentSample {
  const k = fit.states.length;
  const job = { kind: 'gaps' as const, k, counts: fit.counts, alpha: fitPrior(fit), gapCounts: fit.gapCounts ?? [] };
  const run = runChains(job, settings, random, threads);
  return {
    seed: random.seed, chains: settings.chains, warmUp: settings.warmUp, thin: settings.thin, retained: run.retained,
    latent: run.outputs[0]!, rhat: run.rhat, ess: run.ess,
  };
}

/** The sampler a fit needs: with observer error augment-errors.ts, else the bridges between exact surveys. */
export function sampleLatent(fit: Fit, settings: AugmentSettings, random: RandomStream, threads?: number): LatentSample {
  return fit.errorModel ? augmentErrors(fit, settings, random, threads) : augment(fit, settings, random, threads);
}

/** The warning line(s) the user should read when the sampler may not have converged. */
export function augmentationWarnings(a: LatentSample, states: readonly string[], observers: readonly string[] = []): string[] {
  const k = states.length;
  // Cells 0 … k²−1 are P's; with observer error, k² … 2k²−1 are the (pooled) error matrix's, then each observer's.
  const own = a.errors?.observers;
  const rhat = a.errors ? [...a.rhat, ...a.errors.rhat, ...(own?.rhat ?? [])] : Array.from(a.rhat);
  const ess = a.errors ? [...a.ess, ...a.errors.ess, ...(own?.ess ?? [])] : Array.from(a.ess);
  let worstRhat = -1;
  let worstEss = -1;
  for (let c = 0; c < rhat.length; c++) {
    if (rhat[c]! > RHAT_WARNING && (worstRhat < 0 || rhat[c]! > rhat[worstRhat]!)) worstRhat = c;
    if (ess[c]! < ESS_WARNING && (worstEss < 0 || ess[c]! < ess[worstEss]!)) worstEss = c;
  }
  const matrix = (c: number): string => (c < 2 * k * k ? (own ? 'pooled error matrix' : 'error matrix') : `error matrix of ${observers[Math.floor(c / (k * k)) - 2] ?? 'an observer'}`);
  const cell = (c: number): string => (c < k * k ? '' : `${matrix(c)}, true→recorded `) +
    `${states[Math.floor((c % (k * k)) / k)]}→${states[c % k]}`;
  const lines: string[] = [];
  if (a.chains < 2) lines.push('sampler: one chain only, so convergence cannot be checked (R̂ compares chains): refit with --chains 4');
  if (worstRhat >= 0) lines.push(`sampler: R̂ ${rhat[worstRhat]!.toFixed(4)} for ${cell(worstRhat)} (above ${RHAT_WARNING}): the chains disagree; refit with a larger --warm-up and --retained (sere fit)`);
  if (worstEss >= 0) lines.push(`sampler: effective sample size ${Math.round(ess[worstEss]!)} for ${cell(worstEss)} (below ${ESS_WARNING}): refit with a larger --retained (sere fit)`);
  return lines;
}
