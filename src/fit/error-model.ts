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
  /** One error matrix per observer, when the assessment names observers; absent: one shared matrix. */
  readonly observers?: ObserverMatrices;
}

/**
 * One error matrix per assessed observer. The model then has 1 + O matrices: matrix 0 is the
 * pooled one — every observer's assessed counts added up, read as the error of an observer the
 * assessment did not see — and matrix 1 + o is observer o's, from that observer's own counts.
 * Surveys by an assessed observer are read through that observer's matrix, surveys by anyone
 * else through the pooled matrix. The pooled matrix's counts repeat the observers' counts: each
 * matrix's Dirichlet posterior uses each assessed site once, but the pooled matrix is a separate
 * parameter whose evidence overlaps the others' (an informative prior for unassessed observers,
 * not extra data on the assessed ones).
 */
export interface ObserverMatrices {
  /** Assessed observers, in the assessment's order of first appearance: matrix 1 + o. */
  readonly names: readonly string[];
  /** Observers × k × k counts, row = verified (true) state, column = recorded state. */
  readonly assessments: Float64Array;
  /** Surveyed observers the assessment does not name: read through the pooled matrix (a warning). */
  readonly unassessed: readonly string[];
  /** Surveys read through the pooled matrix (by the unassessed observers). */
  readonly pooledSurveys: number;
  /** Assessed observers who made no survey of the table (a note: their matrices rest on the assessment alone). */
  readonly notSurveyed: readonly string[];
}

/** How many error matrices the model has: 1, or 1 + the assessed observers. */
export function matrixCount(model: ErrorModel): number {
  return model.observers ? 1 + model.observers.names.length : 1;
}

/** Every matrix's assessed counts, one k × k after another (matrix 0 pooled): complete data on each. */
export function stackedAssessment(model: ErrorModel): Float64Array {
  if (!model.observers) return model.assessment;
  const out = new Float64Array(model.assessment.length + model.observers.assessments.length);
  out.set(model.assessment, 0);
  out.set(model.observers.assessments, model.assessment.length);
  return out;
}

/**
 * Cells of E that may be non-zero: those the assessment saw (k × k, 1 = possible); the others are
 * the error model's structural zeros. With one matrix per observer the support is the pooled
 * assessment's, the same for every observer: a confusion seen in anyone's assessment is possible
 * for everyone (an observer's own few assessed sites would otherwise make most of its cells
 * impossible and most records unexplainable), and one never seen is impossible for all.
 */
export function errorSupport(model: ErrorModel): Uint8Array {
  return Uint8Array.from(model.assessment, (n) => (n > 0 ? 1 : 0));
}

/**
 * Prior pseudo-count of each possible cell of the error matrix: Jeffreys' ½ (the Dirichlet(½, …, ½)
 * prior of a multinomial row, Jeffreys 1946), the same default as the chain's rows.
 */
export const ERROR_PRIOR = 0.5;
