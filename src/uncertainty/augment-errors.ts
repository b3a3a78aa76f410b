import { errorSupport, ERROR_PRIOR, matrixCount, stackedAssessment } from '../fit/error-model.js';
import { fitPrior, type Fit } from '../fit/fit.js';
import type { LatentSample } from '../fit/latent-sample.js';
import type { AugmentSettings } from './augment.js';
import { sampleDirichlet } from './dirichlet.js';
import { pathScratch, samplePatternPaths, type CompletedRecords } from './error-sampler.js';
import { convergence } from './mcmc-diagnostics.js';
import { multinomialSampler } from './multinomial.js';
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
 * error), the E drawn, and the true mix at the latest survey time.
 */
export function augmentErrors(fit: Fit, settings: AugmentSettings, random: RandomStream): LatentSample {
  const model = fit.errorModel;
  const records = model?.records;
  if (!model || !records) throw new Error('augmentErrors needs a fit with observer error and its records');
  const k = fit.states.length;
  const kk = k * k;
  const alpha = fitPrior(fit);
  const support = errorSupport(model);
  const m = matrixCount(model);
  const assessment = stackedAssessment(model);
  const mkk = m * kk;
  const perChain = Math.ceil(settings.retained / settings.chains);
  const retained = perChain * settings.chains;
  const latent = new Float64Array(retained * kk);
  const emissions = new Float64Array(retained * kk);
  const observerEmissions = m > 1 ? new Float64Array(retained * (mkk - kk)) : undefined;
  const latest = new Float64Array(retained * k);
  const traces = Array.from({ length: kk + mkk }, () => Array.from({ length: settings.chains }, () => new Float64Array(perChain)));
  const firstRecorded = new Float64Array(k);
  for (let q = 0; q < records.count; q++) firstRecorded[records.state[records.start[q]!]!] += records.sites[q]!;
  const params = new Float64Array(mkk);
  const p = new Float64Array(kk);
  const e = new Float64Array(mkk);
  const pi = new Float64Array(k);
  const piParams = new Float64Array(k);
  const done: CompletedRecords = { transitions: new Float64Array(kk), recorded: new Float64Array(mkk), first: new Float64Array(k), latest: new Float64Array(k) };
  const scratch = pathScratch(k);
  const drawAll = (stream: RandomStream, transitions: Float64Array, recorded: Float64Array, first: Float64Array): void => {
    for (let c = 0; c < kk; c++) params[c] = alpha[c]! > 0 ? alpha[c]! + transitions[c]! : 0;
    for (let i = 0; i < k; i++) sampleDirichlet(stream, params, i * k, k, p, i * k);
    for (let c = 0; c < mkk; c++) params[c] = support[c % kk] ? ERROR_PRIOR + assessment[c]! + recorded[c]! : 0;
    for (let x = 0; x < m * k; x++) sampleDirichlet(stream, params, x * k, k, e, x * k);
    for (let x = 0; x < k; x++) piParams[x] = ERROR_PRIOR + first[x]!;
    sampleDirichlet(stream, piParams, 0, k, pi, 0);
  };
  for (let c = 0; c < settings.chains; c++) {
    const stream = random.stream(`chain:${c}`);
    const multinomial = multinomialSampler(stream);
    drawAll(stream, fit.counts, new Float64Array(mkk), firstRecorded);
    for (let sweep = 0; sweep < settings.warmUp + perChain * settings.thin; sweep++) {
      done.transitions.fill(0);
      done.recorded.fill(0);
      done.first.fill(0);
      done.latest.fill(0);
      for (let q = 0; q < records.count; q++) samplePatternPaths(records, q, pi, p, e, k, multinomial, stream.uniform, scratch, done);
      drawAll(stream, done.transitions, done.recorded, done.first);
      const after = sweep - settings.warmUp;
      if (after < 0 || (after + 1) % settings.thin !== 0) continue;
      const kept = (after + 1) / settings.thin - 1;
      const r = c * perChain + kept;
      latent.set(done.transitions, r * kk);
      emissions.set(e.subarray(0, kk), r * kk);
      observerEmissions?.set(e.subarray(kk), r * (mkk - kk));
      latest.set(done.latest, r * k);
      for (let cell = 0; cell < kk; cell++) traces[cell]![c]![kept] = p[cell]!;
      for (let cell = 0; cell < mkk; cell++) traces[kk + cell]![c]![kept] = e[cell]!;
    }
  }
  const rhat = new Float64Array(kk + mkk);
  const ess = new Float64Array(kk + mkk);
  traces.forEach((chains, cell) => {
    const d = settings.chains >= 2 && perChain >= 4 ? convergence(chains) : { rhat: Number.NaN, ess: Number.NaN };
    rhat[cell] = d.rhat;
    ess[cell] = d.ess;
  });
  return {
    seed: random.seed, chains: settings.chains, warmUp: settings.warmUp, thin: settings.thin, retained, latent,
    rhat: rhat.slice(0, kk), ess: ess.slice(0, kk),
    errors: {
      emissions, latest, rhat: rhat.slice(kk, 2 * kk), ess: ess.slice(kk, 2 * kk),
      ...(observerEmissions ? { observers: { emissions: observerEmissions, rhat: rhat.slice(2 * kk), ess: ess.slice(2 * kk) } } : {}),
    },
  };
}
