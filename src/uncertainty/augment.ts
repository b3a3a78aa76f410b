import { maxGap } from '../chain/bridges.js';
import { matrixPowers } from '../chain/matrix.js';
import { fitPrior, type Fit } from '../fit/fit.js';
import type { LatentSample } from '../fit/latent-sample.js';
import { bridgeScratch, sampleBridges } from './bridge-sampler.js';
import { sampleDirichlet } from './dirichlet.js';
import { convergence, ESS_WARNING, RHAT_WARNING } from './mcmc-diagnostics.js';
import { multinomialSampler } from './multinomial.js';
import type { RandomStream } from './random.js';
import { augmentErrors } from './augment-errors.js';

/** How long the data-augmentation sampler runs. */
export interface AugmentSettings {
  /** Independent chains, for the diagnostics (R̂ needs at least two). */
  readonly chains: number;
  /** Sweeps per chain dropped before keeping any. */
  readonly warmUp: number;
  /** Sweeps kept in all, shared equally between chains. */
  readonly retained: number;
  /** Every how many sweeps one is kept (1: all). */
  readonly thin: number;
}

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
 * conjugate update the closed-form posterior already uses.
 *
 * Each chain c runs on `random.stream('chain:c')` and starts from a draw of the posterior given the
 * one-step counts alone (more spread than the target, as R̂ wants). Same seed → same retained sweeps.
 */
export function augment(fit: Fit, settings: AugmentSettings, random: RandomStream): LatentSample {
  const k = fit.states.length;
  const gapCounts = fit.gapCounts ?? [];
  const g = maxGap(gapCounts);
  const alpha = fitPrior(fit);
  const perChain = Math.ceil(settings.retained / settings.chains);
  const retained = perChain * settings.chains;
  const latent = new Float64Array(retained * k * k);
  const traces = Array.from({ length: k * k }, () => Array.from({ length: settings.chains }, () => new Float64Array(perChain)));
  const posterior = new Float64Array(k * k);
  const completed = new Float64Array(k * k);
  const p = new Float64Array(k * k);
  const scratch = bridgeScratch(k);
  for (let c = 0; c < settings.chains; c++) {
    const stream = random.stream(`chain:${c}`);
    const multinomial = multinomialSampler(stream);
    for (let cell = 0; cell < k * k; cell++) posterior[cell] = alpha[cell]! > 0 ? alpha[cell]! + fit.counts[cell]! : 0;
    for (let i = 0; i < k; i++) sampleDirichlet(stream, posterior, i * k, k, p, i * k);
    for (let sweep = 0; sweep < settings.warmUp + perChain * settings.thin; sweep++) {
      const powers = matrixPowers(p, k, g);
      completed.fill(0);
      for (const cell of gapCounts) sampleBridges(p, k, powers, cell, multinomial, completed, scratch);
      for (let cell = 0; cell < k * k; cell++) posterior[cell] = alpha[cell]! > 0 ? alpha[cell]! + fit.counts[cell]! + completed[cell]! : 0;
      for (let i = 0; i < k; i++) sampleDirichlet(stream, posterior, i * k, k, p, i * k);
      const after = sweep - settings.warmUp;
      if (after < 0 || (after + 1) % settings.thin !== 0) continue;
      const kept = (after + 1) / settings.thin - 1;
      latent.set(completed, (c * perChain + kept) * k * k);
      for (let cell = 0; cell < k * k; cell++) traces[cell]![c]![kept] = p[cell]!;
    }
  }
  const rhat = new Float64Array(k * k);
  const ess = new Float64Array(k * k);
  traces.forEach((chains, cell) => {
    const d = settings.chains >= 2 && perChain >= 4 ? convergence(chains) : { rhat: Number.NaN, ess: Number.NaN };
    rhat[cell] = d.rhat;
    ess[cell] = d.ess;
  });
  return { seed: random.seed, chains: settings.chains, warmUp: settings.warmUp, thin: settings.thin, retained, latent, rhat, ess };
}

/** The sampler a fit needs: with observer error augment-errors.ts, else the bridges between exact surveys. */
export function sampleLatent(fit: Fit, settings: AugmentSettings, random: RandomStream): LatentSample {
  return fit.errorModel ? augmentErrors(fit, settings, random) : augment(fit, settings, random);
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
  if (worstRhat >= 0) lines.push(`sampler: R̂ ${rhat[worstRhat]!.toFixed(4)} for ${cell(worstRhat)} (above ${RHAT_WARNING}): the chains disagree; refit with more warm-up and retained draws`);
  if (worstEss >= 0) lines.push(`sampler: effective sample size ${Math.round(ess[worstEss]!)} for ${cell(worstEss)} (below ${ESS_WARNING}): refit with more retained draws`);
  return lines;
}
