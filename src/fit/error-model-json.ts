import { toRows } from '../chain/matrix.js';
import type { ErrorEstimate } from '../chain/error-em.js';
import type { GapEstimate } from '../chain/gap-em.js';
import { errorSupport, ERROR_PRIOR } from './error-model.js';
import type { Fit } from './fit.js';
import type { ErrorSweeps, LatentSample } from './latent-sample.js';

export const ERROR_ORIENTATION = 'rows are true (verified) states, columns are recorded states';

/**
 * The fit file's `error_model`: where the assessment came from, its counts, the maximum-likelihood
 * error matrix and first-survey mix, and the totals every retained sweep must match (checked when
 * read back, error-model-check.ts). Null without observer error.
 */
export function errorModelJson(fit: Fit, mle: GapEstimate): object | null {
  const model = fit.errorModel;
  if (!model) return null;
  const k = fit.states.length;
  const estimate = mle as ErrorEstimate;
  const records = model.records;
  return {
    file: model.file,
    sha256: model.sha256,
    orientation: ERROR_ORIENTATION,
    // null: one shared matrix, every observer assumed to err alike. Otherwise each assessed
    // observer's own matrix; `assessment` and `probabilities` below are then the pooled matrix's,
    // which the observers in `pooled_for` are read through.
    observers: model.observers ? model.observers.names.map((name, o) => ({
      name,
      assessment: toRows(model.observers!.assessments.subarray(o * k * k, (o + 1) * k * k), k),
      probabilities: toRows(estimate.emission.subarray((1 + o) * k * k, (2 + o) * k * k), k),
    })) : null,
    ...(model.observers ? {
      pooled_for: model.observers.unassessed, pooled_surveys: model.observers.pooledSurveys, not_surveyed: model.observers.notSurveyed,
    } : {}),
    assessment: toRows(model.assessment, k),
    dropped_rows: model.droppedRows,
    prior: { name: 'jeffreys', pseudo_count: ERROR_PRIOR, cells: 'those the assessment saw; the others are structural zeros' },
    probabilities: toRows(estimate.emission.subarray(0, k * k), k),
    initial: Array.from(estimate.initial),
    record_patterns: records ? records.count : null,
    true_transitions: model.trueTransitions,
    support: toRows(Array.from(errorSupport(model)), k),
  };
}

/** What the sampler keeps with observer error, beside the true transitions (`latent_counts`). */
export function errorSweepsJson(s: LatentSample, e: ErrorSweeps, k: number): object {
  const finite = (x: number): number | null => (Number.isFinite(x) ? x : null);
  const values = (a: Float64Array): number[] => Array.from(a).filter(Number.isFinite);
  return {
    error_rhat_max: values(e.rhat).length ? Math.max(...values(e.rhat)) : null,
    error_ess_min: values(e.ess).length ? Math.min(...values(e.ess)) : null,
    error_rhat: toRows(Array.from(e.rhat, finite), k),
    error_ess: toRows(Array.from(e.ess, finite), k),
    error_matrices: Array.from({ length: s.retained }, (_, r) => Array.from(e.emissions.subarray(r * k * k, (r + 1) * k * k))),
    latest_true_counts: Array.from({ length: s.retained }, (_, r) => Array.from(e.latest.subarray(r * k, (r + 1) * k))),
    ...(e.observers ? observerSweepsJson(s.retained, e.observers, k) : {}),
  };
}

/** Each assessed observer's matrices: per retained sweep, one k² list per observer; the diagnostics one k × k grid per observer. */
function observerSweepsJson(retained: number, o: NonNullable<ErrorSweeps['observers']>, k: number): object {
  const kk = k * k;
  const count = o.rhat.length / kk;
  const finite = (x: number): number | null => (Number.isFinite(x) ? x : null);
  const grids = (a: Float64Array): (number | null)[][][] => Array.from({ length: count }, (_, m) => toRows(Array.from(a.subarray(m * kk, (m + 1) * kk), finite), k));
  return {
    observer_error_matrices: Array.from({ length: retained }, (_, r) => Array.from({ length: count }, (_, m) => Array.from(o.emissions.subarray((r * count + m) * kk, (r * count + m + 1) * kk)))),
    observer_error_rhat: grids(o.rhat),
    observer_error_ess: grids(o.ess),
  };
}
