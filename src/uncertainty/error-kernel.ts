import { ERROR_PRIOR } from '../fit/error-model.js';
import type { ChainKernel, ErrorJob } from './chain-kernel.js';
import { sampleDirichlet } from './dirichlet.js';
import { pathScratch } from './error-sampler.js';
import { multinomialSampler } from './multinomial.js';
import { pathKernel } from './path-kernel.js';
import { keyOf, type RandomStream } from './random.js';
import { fillSweepTables } from './sweep-tables.js';

/**
 * One chain of the observer-error sampler (augment-errors.ts). Starts from P drawn given the
 * recorded one-step counts, E given the assessment alone and π given the first recorded states; a
 * sweep draws every record pattern's true paths given (π, P, E) (error-sampler.ts), then P, each
 * error matrix and π from their conjugate Dirichlets. Retained: the true transitions, the first
 * error matrix, the observers' matrices, the latest true mix; traced: P then every error matrix.
 */
export function errorKernel(job: ErrorJob, stream: RandomStream): ChainKernel {
  const { k, m, counts, alpha, support, assessment, records, firstRecorded } = job;
  const kk = k * k;
  const mkk = m * kk;
  // The paths in WebAssembly, on the chain stream's own uniforms: every draw of the chain goes through `random`.
  const paths = pathKernel(k, m, records, keyOf(stream));
  const { random, tables, pi, done } = paths;
  const multinomial = multinomialSampler(random);
  const params = new Float64Array(mkk);
  const p = new Float64Array(kk);
  const e = new Float64Array(mkk);
  const piParams = new Float64Array(k);
  const scratch = pathScratch(k);
  const drawAll = (transitions: Float64Array, recorded: Float64Array, first: Float64Array): void => {
    for (let c = 0; c < kk; c++) params[c] = alpha[c]! > 0 ? alpha[c]! + transitions[c]! : 0;
    for (let i = 0; i < k; i++) sampleDirichlet(random, params, i * k, k, p, i * k);
    for (let c = 0; c < mkk; c++) params[c] = support[c % kk] ? ERROR_PRIOR + assessment[c]! + recorded[c]! : 0;
    for (let x = 0; x < m * k; x++) sampleDirichlet(random, params, x * k, k, e, x * k);
    for (let x = 0; x < k; x++) piParams[x] = ERROR_PRIOR + first[x]!;
    sampleDirichlet(random, piParams, 0, k, pi, 0);
  };
  return {
    start: () => drawAll(counts, new Float64Array(mkk), firstRecorded),
    sweep() {
      fillSweepTables(tables, p, e);
      paths.sweep(multinomial, scratch);
      drawAll(done.transitions, done.recorded, done.first);
    },
    keep(row, outputs, trace) {
      outputs[0]!.set(done.transitions, row * kk);
      outputs[1]!.set(e.subarray(0, kk), row * kk);
      if (m > 1) outputs[2]!.set(e.subarray(kk), row * (mkk - kk));
      outputs[3]!.set(done.latest, row * k);
      trace.set(p);
      trace.set(e, kk);
    },
  };
}
