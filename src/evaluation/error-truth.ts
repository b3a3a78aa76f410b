import { trueShares } from '../chain/latest-mix.js';
import { ERROR_PRIOR, matrixCount } from '../fit/error-model.js';
import { fitPrior, type Fit } from '../fit/fit.js';
import type { LatentSample } from '../fit/latent-sample.js';
import { sampleDirichlet } from '../uncertainty/dirichlet.js';
import { pathScratch, samplePatternPaths, type CompletedRecords } from '../uncertainty/error-sampler.js';
import { multinomialSampler } from '../uncertainty/multinomial.js';
import type { RandomStream } from '../uncertainty/random.js';
import { fillSweepTables, sweepTables } from '../uncertainty/sweep-tables.js';

/** One replicate's "truth" for survey effort with observer error: what the future surveys are simulated from. */
export interface ErrorTruth {
  /** k × k: the true chain. */
  readonly p: Float64Array;
  /** The error matrices one after another (k × k each, matrix 0 the pooled one; fit/error-model.ts), row = true. */
  readonly e: Float64Array;
  /** Pattern q's sites by true state at the latest survey time, at q × k; filled only for patterns surveyed then (extend 0). */
  readonly latestByPattern: Float64Array;
  /** k: the true mix at the latest survey time (where new plots are drawn from). */
  readonly latestShares: Float64Array;
}

/**
 * A draw of (π, P, E, every site's true path) from the posterior given the records, made from one
 * retained sweep r of the error-model sampler (augment-errors.ts), which keeps the sweep's true
 * transitions T_r, its error matrices E_r and its true latest counts but not the paths site by site.
 * The sweep's completed data are a posterior draw, so one more half-sweep of the same Gibbs sampler
 * keeps the posterior (Tanner & Wong 1987): P ~ Dirichlet(α + T_r) row by row (as posteriorDraws
 * does), E = E_r (drawn given the same completed data), π ~ Dirichlet(½ + the true first states),
 * then every path given (π, P, E) by forward filtering, backward sampling (error-sampler.ts).
 * The first true states are not kept either; they are recovered from the sweep: along each path
 * out-steps minus in-steps of a state is (first − end), so first = row sums − column sums of T_r +
 * the true latest counts. Exact when every site is carried to the latest time; a site whose last
 * survey is not a whole number of steps before it (not carried) ends elsewhere, and its first state
 * is then left out (clipped at 0) — π only weighs a path's first step.
 */
export function errorTruth(fit: Fit, latent: LatentSample, random: RandomStream): ErrorTruth {
  const model = fit.errorModel;
  const records = model?.records;
  const sweeps = latent.errors;
  if (!model || !records || !sweeps) throw new Error('internal: errorTruth needs a fit with observer error, its records and the sampler\'s error sweeps');
  const k = fit.states.length;
  const kk = k * k;
  const m = matrixCount(model);
  const r = random.integer(latent.retained);
  const alpha = fitPrior(fit);
  const params = new Float64Array(kk);
  for (let c = 0; c < kk; c++) params[c] = alpha[c]! > 0 ? alpha[c]! + latent.latent[r * kk + c]! : 0;
  const p = new Float64Array(kk);
  for (let i = 0; i < k; i++) sampleDirichlet(random, params, i * k, k, p, i * k);
  const e = new Float64Array(m * kk);
  e.set(sweeps.emissions.subarray(r * kk, (r + 1) * kk), 0);
  if (m > 1) e.set(sweeps.observers!.emissions.subarray(r * (m - 1) * kk, (r + 1) * (m - 1) * kk), kk);
  // Dirichlet(½ + the first true states) for π, the first states recovered as above.
  const piParams = new Float64Array(k);
  for (let x = 0; x < k; x++) {
    let out = 0;
    for (let b = 0; b < k; b++) out += latent.latent[r * kk + x * k + b]! - latent.latent[r * kk + b * k + x]!;
    piParams[x] = ERROR_PRIOR + Math.max(0, out + sweeps.latest[r * k + x]!);
  }
  const pi = new Float64Array(k);
  sampleDirichlet(random, piParams, 0, k, pi, 0);
  const latestByPattern = new Float64Array(records.count * k);
  const done: CompletedRecords = { transitions: new Float64Array(kk), recorded: new Float64Array(m * kk), first: new Float64Array(k), latest: new Float64Array(k) };
  const scratch = pathScratch(k);
  const tables = sweepTables(k, m);
  fillSweepTables(tables, p, e);
  const multinomial = multinomialSampler(random);
  for (let q = 0; q < records.count; q++) {
    if (records.extend[q] !== 0) continue;
    done.latest.fill(0);
    samplePatternPaths(records, q, pi, tables, multinomial, random.uniform, scratch, done);
    latestByPattern.set(done.latest, q * k);
  }
  const latestShares = new Float64Array(k);
  trueShares(sweeps.latest, r, k, latestShares, 0);
  return { p, e, latestByPattern, latestShares };
}
