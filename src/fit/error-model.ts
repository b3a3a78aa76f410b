import type { ErrorEstimate } from '../chain/error-em.js';
import type { RecordPatterns } from '../chain/record-patterns.js';

/**
 * Observer error as a fit keeps it: the accuracy assessment (counts, row = verified true state,
 * column = recorded state) and where it came from; each site's record, pooled by pattern, for EM
 * and the sampler (absent when the fit was read from a fit file, whose MLE and retained sweeps
 * were made at fit time and are read back instead).
 */
export interface ErrorModel {
  readonly file: string;
  readonly sha256: string;
  /** k × k counts, row = verified (true) state, column = recorded state. */
  readonly assessment: Float64Array;
  /** Assessment rows left out by the label map (labels mapped to skip). */
  readonly droppedRows: number;
  readonly records?: RecordPatterns;
  /** One-step transitions in all the true paths (first survey to the latest time, or to the last survey for a site not carried): what each retained sweep holds. */
  readonly trueTransitions: number;
  /** The maximum-likelihood fit as read from a fit file (a fit made from records works it out). */
  readonly mle?: ErrorEstimate;
}

/** Cells of E that may be non-zero: those the assessment saw (k × k, 1 = possible); the others are the error model's structural zeros. */
export function errorSupport(model: ErrorModel): Uint8Array {
  return Uint8Array.from(model.assessment, (n) => (n > 0 ? 1 : 0));
}

/**
 * Prior pseudo-count of each possible cell of the error matrix: Jeffreys' ½ (the Dirichlet(½, …, ½)
 * prior of a multinomial row, Jeffreys 1946), the same default as the chain's rows.
 */
export const ERROR_PRIOR = 0.5;
