import { maximumLikelihood } from './estimates.js';
import type { GapEstimate } from './gap-em.js';
import { EM_TOLERANCE } from './gap-em.js';
import { errorEStepKernel } from './em-kernel.js';
import type { RecordPatterns } from './record-patterns.js';
import { acceleratedEm } from './squarem.js';

/** The maximum-likelihood fit of a chain seen through observer error. */
export interface ErrorEstimate extends GapEstimate {
  /**
   * k × k, row = true state, column = recorded state: E[x, r] = P(recorded r | true x); with one
   * matrix per observer, M such matrices one after another (fit/error-model.ts: matrix 0 pooled).
   */
  readonly emission: Float64Array;
  /** The true-state mix at sites' first surveys (π). */
  readonly initial: Float64Array;
}

/**
 * EM iterations with observer error are the costly part of a fit (one forward–backward per record
 * pattern each): they stop at this many even if not converged (reported).
 */
export const ERROR_EM_MAX_ITERATIONS = 5000;

/**
 * Maximum likelihood of the one-step matrix P, the error matrix E and the first-survey mix π from
 * sites' records seen through observer error and an accuracy assessment, by EM — the Baum–Welch
 * algorithm (Baum et al. 1970; Rabiner 1989, §III.C) with the assessment's counts added to E's
 * expected counts, since they are complete data on the same E (assessed sites: true state known,
 * recorded state seen).
 *
 * Likelihood: Σ_patterns n · log P(record | π, P, E) + Σ A[x, r] · log E[x, r]; each site's path
 * runs from its first survey to its last, one step at a time, unsurveyed steps emitting all ones.
 * E-step: forward–backward per pattern (chain/forward-backward.ts; error-e-step.ts, run in
 * WebAssembly by em-kernel.ts). M-step: P from the expected transitions (maximumLikelihood:
 * structural zeros stay zero, a row never entered takes the prior mean and is flagged), E row by
 * row from A + expected true→recorded counts, π from the expected first true states.
 *
 * With one error matrix per observer, `assessment` holds M matrices of counts one after another
 * (matrix m's counts are complete data on E_m alone) and each survey's emission is its own
 * matrix's (record-patterns.ts): the E-step adds each survey's expected true→recorded counts to its
 * matrix, and the M-step normalises every row of every matrix. With M = 1 this is the one-matrix
 * algorithm, step for step.
 *
 * Start: P0 as given (the caller's posterior mean of the recorded counts), E0 the assessment's own
 * proportions (an observer's on the pooled support: startingErrorCounts), π0 uniform. A cell of E that the assessment never saw is zero at the start and, EM
 * keeping zeros, zero at the end: the error model's structural zeros (fit.ts decides this and
 * checks every record is possible under them).
 *
 * The EM steps are accelerated by SQUAREM (squarem.ts; Varadhan & Roland 2008): the same maximum
 * and stopping rule, fewer E-steps — on the `observer` bench 176 plain EM steps became 43 (CPU
 * 14.2 s → 3.8 s, the same log-likelihood to 6 decimals).
 */
export function errorMaximumLikelihood(records: RecordPatterns, assessment: Float64Array, alpha: Float64Array, k: number,
  start: Float64Array, maxIterations = ERROR_EM_MAX_ITERATIONS): ErrorEstimate {
  const rows = assessment.length / k;
  const kk = k * k;
  // θ = (P, every error matrix, π), one vector for the accelerated EM (squarem.ts).
  const theta = new Float64Array(kk + assessment.length + k);
  theta.set(start, 0);
  rowNormalise(startingErrorCounts(assessment, kk), rows, theta.subarray(kk, kk + assessment.length), k);
  theta.fill(1 / k, kk + assessment.length);
  const parts = (t: Float64Array) => ({ p: t.subarray(0, kk), e: t.subarray(kk, kk + assessment.length), pi: t.subarray(kk + assessment.length) });
  // The E-step in WebAssembly (em-kernel.ts): error-e-step.ts errorEStep's numbers, bit for bit.
  const kernel = errorEStepKernel(records, k, rows / k);
  const run = acceleratedEm(
    (t) => { const { p, e, pi } = parts(t); return kernel.eStep(assessment, pi, p, e); },
    (step) => {
      const next = new Float64Array(theta.length);
      next.set(maximumLikelihood(step.transitions, alpha, k).p, 0);
      const { e, pi } = parts(next);
      rowNormalise(step.records, rows, e, k);
      rowNormalise(step.first, 1, pi, k);
      return next;
    },
    theta, maxIterations, EM_TOLERANCE);
  const { p, e, pi } = parts(run.theta);
  const estimate = maximumLikelihood(run.step.transitions, alpha, k);
  return {
    p: p.slice(), rowsFromPrior: estimate.rowsFromPrior, rowsNeverLeft: estimate.rowsNeverLeft, expected: run.step.transitions,
    logLikelihood: run.step.logLikelihood, iterations: run.iterations, converged: run.converged, emission: e.slice(), initial: pi.slice(),
  };
}

/**
 * Counts E0 is made from: each matrix's own assessed counts, and for an observer's matrix (m ≥ 1)
 * ½ — the sampler's prior — on every cell of the pooled support (matrix 0's seen cells) its own
 * assessment left at 0. EM keeps a zero at zero, so starting an observer's matrix on its own
 * support alone would forbid, for ever, a confusion only another observer's assessment saw, though
 * the model (error-model.ts errorSupport) and the sampler allow it: a record only such a confusion
 * explains then had likelihood 0 and the MLE was NaN. With one matrix nothing changes.
 */
function startingErrorCounts(assessment: Float64Array, kk: number): Float64Array {
  const counts = Float64Array.from(assessment);
  for (let c = kk; c < counts.length; c++) if (counts[c] === 0 && assessment[c % kk]! > 0) counts[c] = 0.5;
  return counts;
}

/** Each of `rows` rows of `width` divided by its sum (a row summing to 0 stays 0). */
function rowNormalise(m: Float64Array, rows: number, out: Float64Array, width = rows): Float64Array {
  for (let i = 0; i < rows; i++) {
    let total = 0;
    for (let j = 0; j < width; j++) total += m[i * width + j]!;
    for (let j = 0; j < width; j++) out[i * width + j] = total > 0 ? m[i * width + j]! / total : 0;
  }
  return out;
}

/**
 * The log-likelihood of the records and the assessment at (π, P, E), for checks against an
 * independent optimiser and brute force.
 */
export function errorLogLikelihood(records: RecordPatterns, assessment: Float64Array, pi: Float64Array, p: Float64Array, e: Float64Array, k: number): number {
  return errorEStepKernel(records, k, assessment.length / (k * k)).eStep(assessment, pi, p, e).logLikelihood;
}
