import type { Command } from 'commander';
import { needsSampler, type Fit } from '../fit/fit.js';
import { augmentationWarnings, DEFAULT_AUGMENT, sampleLatent } from '../uncertainty/augment.js';
import { randomStreams } from '../uncertainty/random.js';
import type { Io } from './io.js';
import { seedFlag, threadsFlag, wholeNumber } from './parse-options.js';
import { flagSeed } from './seed.js';
import { LIMITS } from '../limits.js';
import { observerNotes } from '../report/error-table.js';
import { cachedSample } from '../uncertainty/sample-cache.js';

export interface SamplerFlags {
  seed?: number;
  chains: number;
  warmUp: number;
  retained: number;
  thin: number;
  threads?: number;
}

/** The flags of the data-augmentation sampler that `sere fit` runs when pairs are further apart than one step. */
export function withSamplerOptions(command: Command): Command {
  return command
    .option('--seed <n>', 'seed of the posterior sampler, used only when pairs are further apart than one step, with --errors or with --pooling partial (printed when not given)', seedFlag)
    .option('--chains <n>', 'posterior sampler: independent chains (for R̂)', wholeNumber(64), DEFAULT_AUGMENT.chains)
    .option('--warm-up <n>', 'posterior sampler: sweeps dropped per chain', wholeNumber(LIMITS.draws), DEFAULT_AUGMENT.warmUp)
    .option('--retained <n>', 'posterior sampler: sweeps kept in all (shared between chains)', wholeNumber(LIMITS.draws), DEFAULT_AUGMENT.retained)
    .option('--thin <n>', 'posterior sampler: keep every n-th sweep after the warm-up', wholeNumber(1000), DEFAULT_AUGMENT.thin)
    .option('--threads <n>', 'posterior sampler: threads its chains run on (default: every core for large fits, one for small ones); the results are the same for any number', threadsFlag);
}

/**
 * A fit with pairs further apart than one step gets its posterior sampler run now, seeded, and
 * carries the retained latent counts into its file; a warning line when R̂ or the ESS say the
 * draws are not yet to be trusted. A fit without gaps is returned as it is.
 */
export function sampleFit(fit: Fit, flags: SamplerFlags, io: Io): Fit {
  if (!needsSampler(fit)) return fit;
  // Surveyed observers without their own error matrix: said before the (long) sampler runs.
  const observers = fit.errorModel?.observers;
  if (observers) for (const line of observerNotes(observers)) if (line.startsWith('warning: ')) io.stderr(`sere: ${line}\n`);
  // Picked once: with --by, every group's sampler uses the seed announced, so the run repeats.
  const seed = flags.seed ??= flagSeed(undefined, io);
  const settings = { chains: flags.chains, warmUp: flags.warmUp, retained: flags.retained, thin: flags.thin };
  const random = randomStreams(seed).stream('augment');
  // Fit-time work an earlier run with the same fit, settings and seed may have kept (sample-cache.ts).
  const latentSample = cachedSample({ sample: 'latent', fit, settings, seed, stream: random.name }, () => sampleLatent(fit, settings, random, flags.threads));
  for (const line of augmentationWarnings(latentSample, fit.states, fit.errorModel?.observers?.names)) io.stderr(`sere: warning: ${line}\n`);
  return { ...fit, latentSample };
}
