import { errorSupport, matrixCount, stackedAssessment } from '../fit/error-model.js';
import { fitPrior, type Fit } from '../fit/fit.js';
import type { LatentSample } from '../fit/latent-sample.js';
import { runChains, type AugmentSettings } from './chain-runner.js';
import type { RandomStream } from './random.js';

/**
 * The posterior of P and the error matrix E with observer error, by data augmentation (Tanner &
 * Wong 1987): alternate (true paths | π, P, E), drawn pattern by pattern by forward filtering,
 * backward sampling (error-sampler.ts), and (π, P, E | completed data), each row from its
 * conjugate Dirichlet —
 *   P row i:  Dirichlet(prior αᵢ + true transitions from i), structural zeros kept;
 *   E row x:  Dirichlet(½ + assessment counts A[x, ·] + the surveys' true-x-recorded-r counts) on
 *             the cells the assessment saw (the others are the model's structural zeros);
 *   π:        Dirichlet(½ + the true states at first surveys).
 * With one error matrix per observer every matrix m is drawn the same way from its own counts
 * (Dirichlet(½ + A_m[x, ·] + the true-x-recorded-r counts of the surveys recorded through m)),
 * matrix after matrix, after P; with one matrix the draws are those of the one-matrix sampler.
 * Each chain c runs on `random.stream('chain:c')` and starts from P drawn given the recorded
 * one-step counts, E given the assessment alone and π given the first recorded states. The
 * retained sweeps keep the true transitions (so a matrix draw is Dirichlet(α + those), as without
 * error), the E drawn, and the true mix at the latest survey time (error-kernel.ts). The same on
 * any number of `threads` (chain-runner.ts).
 */
export function augmentErrors(fit: Fit, settings: AugmentSettings, random: RandomStream, threads?: number): LatentSample {
  const model = fit.errorModel;
  const records = model?.records;
  if (!model || !records) throw new Error('augmentErrors needs a fit with observer error and its records');
  const k = fit.states.length;
  const kk = k * k;
  const m = matrixCount(model);
  const firstRecorded = new Float64Array(k);
  for (let q = 0; q < records.count; q++) firstRecorded[records.state[records.start[q]!]!] += records.sites[q]!;
  const job = {
    kind: 'errors' as const, k, m, counts: fit.counts, alpha: fitPrior(fit), support: errorSupport(model),
    assessment: stackedAssessment(model), records, firstRecorded,
  };
  const run = runChains(job, settings, random, threads);
  const [latent, emissions, observerEmissions, latest] = run.outputs;
  const { rhat, ess } = run;
  return {
    seed: random.seed, chains: settings.chains, warmUp: settings.warmUp, thin: settings.thin, retained: run.retained, latent: latent!,
    rhat: rhat.slice(0, kk), ess: ess.slice(0, kk),
    errors: {
      emissions: emissions!, latest: latest!, rhat: rhat.slice(kk, 2 * kk), ess: ess.slice(kk, 2 * kk),
      ...(m > 1 ? { observers: { emissions: observerEmissions!, rhat: rhat.slice(2 * kk), ess: ess.slice(2 * kk) } } : {}),
    },
  };
}
