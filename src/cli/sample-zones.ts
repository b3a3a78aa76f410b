import type { Fit } from '../fit/fit.js';
import { zoneSamplerWarnings } from '../fit/zone-sampler.js';
import { randomStreams } from '../uncertainty/random.js';
import { cachedSample } from '../uncertainty/sample-cache.js';
import { zoneSamplerRun } from '../uncertainty/zone-draws.js';
import type { Io } from './io.js';
import { flagSeed } from './seed.js';

/**
 * A partially pooled fit gets its zones' posterior sampler run now, with the fit's seed (announced
 * when not given), for its convergence diagnostics: on the seed's `matrices` stream, so these are
 * the diagnostics of the very sampler a forecast with the same seed runs. A warning line when R̂ or
 * the ESS say its draws are not yet to be trusted. Any other fit is returned as it is.
 */
export function sampleZonePooling(fit: Fit, flags: { seed?: number; threads?: number }, io: Io): Fit {
  if (fit.zones?.pooling !== 'partial') return fit;
  const seed = flags.seed ??= flagSeed(undefined, io);
  const random = randomStreams(seed).stream('matrices');
  const sampler = cachedSample({ sample: 'zone-sampler', fit, seed, stream: random.name }, () => zoneSamplerRun(fit, random, undefined, flags.threads));
  for (const w of zoneSamplerWarnings(sampler, fit.states, fit.zones.zones.map((z) => z.name))) io.stderr(`sere: warning: ${w.line}\n`);
  return { ...fit, zones: { ...fit.zones, sampler } };
}
