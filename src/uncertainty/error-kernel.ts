import { ERROR_PRIOR } from '../fit/error-model.js';
import type { ChainKernel, ErrorJob } from './chain-kernel.js';
import { sampleDirichlet } from './dirichlet.js';
import { pathScratch, samplePatternPaths, type CompletedRecords } from './error-sampler.js';
import { multinomialSampler } from './multinomial.js';
import type { RandomStream } from './random.js';
import { fillSweepTables, sweepTables } from './sweep-tables.js';

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
  const multinomial = multinomialSampler(stream);
  const params = new Float64Array(mkk);
  const p = new Float64Array(kk);
  const e = new Float64Array(mkk);
  const pi = new Float64Array(k);
  const piParams = new Float64Array(k);
  const done: CompletedRecords = { transitions: new Float64Array(kk), recorded: new Float64Array(mkk), first: new Float64Array(k), latest: new Float64Array(k) };
  const scratch = pathScratch(k);
  const tables = sweepTables(k, m);
  const drawAll = (transitions: Float64Array, recorded: Float64Array, first: Float64Array): void => {
    for (let c = 0; c < kk; c++) params[c] = alpha[c]! > 0 ? alpha[c]! + transitions[c]! : 0;
    for (let i = 0; i < k; i++) sampleDirichlet(stream, params, i * k, k, p, i * k);
    for (let c = 0; c < mkk; c++) params[c] = support[c % kk] ? ERROR_PRIOR + assessment[c]! + recorded[c]! : 0;
    for (let x = 0; x < m * k; x++) sampleDirichlet(stream, params, x * k, k, e, x * k);
    for (let x = 0; x < k; x++) piParams[x] = ERROR_PRIOR + first[x]!;
    sampleDirichlet(stream, piParams, 0, k, pi, 0);
  };
  return {
    start: () => drawAll(counts, new Float64Array(mkk), firstRecorded),
    sweep() {
      done.transitions.fill(0);
      done.recorded.fill(0);
      done.first.fill(0);
      done.latest.fill(0);
      fillSweepTables(tables, p, e);
      for (let q = 0; q < records.count; q++) samplePatternPaths(records, q, pi, tables, multinomial, stream.uniform, scratch, done);
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
