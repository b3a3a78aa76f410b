import type { KeyPath } from '../data/read-structured.js';
import type { ErrorEstimate } from '../chain/error-em.js';
import type { FitFile } from './fit-file-schema.js';
import type { ErrorModel, ObserverMatrices } from './error-model.js';
import type { ErrorSweeps } from './latent-sample.js';

type Fail = (what: string, path: KeyPath, hint?: string) => never;

/** A row of probabilities read back from a file sums to 1 within this (17 significant digits are written). */
const ROW_SUM_TOLERANCE = 1e-9;

/**
 * A fit file's `error_model` (fit/error-model-json.ts), checked at the door: the assessment k × k
 * with every state verified at least once; the error matrix and the chain at the MLE stochastic,
 * zero where the model says a cell is impossible; the first-survey mix summing to 1. The records
 * themselves are not in the file, so the MLE is read back rather than refitted. Undefined
 * without an error model.
 */
export function checkErrorModel(f: FitFile, k: number, mask: Uint8Array, fail: Fail): ErrorModel | undefined {
  const m = f.error_model;
  if (m === undefined || m === null) return undefined;
  const grid = (rows: readonly (readonly number[])[], path: KeyPath): Float64Array => {
    if (rows.length !== k || rows.some((row) => row.length !== k)) fail(`not ${k}×${k}`, path);
    return Float64Array.from(rows.flat());
  };
  const assessment = grid(m.assessment, ['error_model', 'assessment']);
  const emission = grid(m.probabilities, ['error_model', 'probabilities']);
  for (let x = 0; x < k; x++) {
    if (assessment.subarray(x * k, (x + 1) * k).every((n) => n === 0)) fail(`state ${x} was never verified`, ['error_model', 'assessment', x]);
  }
  checkStochastic(emission, k, (c) => assessment[c] === 0, ['error_model', 'probabilities'], fail);
  const observers = checkObservers(m, k, assessment, fail);
  // The MLE's matrices one after another, matrix 0 pooled (error-model.ts), as EM gives them.
  const emissions = observers ? Float64Array.from([...emission, ...observers.probabilities]) : emission;
  if (m.initial.length !== k || Math.abs(m.initial.reduce((a, b) => a + b, 0) - 1) > ROW_SUM_TOLERANCE) fail(`not ${k} shares summing to 1`, ['error_model', 'initial']);
  if (!f.probabilities || !f.estimation) fail('a fit with observer error keeps its probabilities and estimation', ['probabilities']);
  const p = grid(f.probabilities!, ['probabilities']);
  checkStochastic(p, k, (c) => mask[c] === 1, ['probabilities'], fail);
  const expected = grid(f.estimation!.expected_counts, ['estimation', 'expected_counts']);
  const rowsFromPrior: number[] = [];
  const rowsNeverLeft: number[] = [];
  for (let i = 0; i < k; i++) {
    const n = expected.subarray(i * k, (i + 1) * k).reduce((a, b) => a + b, 0);
    if (n === 0) rowsFromPrior.push(i);
    else if (expected[i * k + i] === n) rowsNeverLeft.push(i);
  }
  const mle: ErrorEstimate = {
    p, emission: emissions, initial: Float64Array.from(m.initial), expected, rowsFromPrior, rowsNeverLeft,
    logLikelihood: f.estimation!.log_likelihood, iterations: f.estimation!.iterations, converged: f.estimation!.converged,
  };
  return {
    file: m.file, sha256: m.sha256, assessment, droppedRows: m.dropped_rows, mle, trueTransitions: m.true_transitions,
    ...(observers ? { observers: observers.model } : {}),
  };
}

/**
 * `error_model.observers`: each observer's assessment (k × k; added up, the pooled assessment
 * above) and MLE matrix (stochastic, zero off the pooled support), names distinct. Undefined
 * when null or absent (one shared matrix).
 */
function checkObservers(m: NonNullable<FitFile['error_model']>, k: number, pooled: Float64Array, fail: Fail):
  { model: ObserverMatrices; probabilities: Float64Array } | undefined {
  if (!m.observers) return undefined;
  const kk = k * k;
  const count = m.observers.length;
  if (count === 0) fail('an empty list of observers (write null for one shared matrix)', ['error_model', 'observers']);
  const assessments = new Float64Array(count * kk);
  const probabilities = new Float64Array(count * kk);
  const sum = new Float64Array(kk);
  const names = m.observers.map((o) => o.name);
  m.observers.forEach((o, i) => {
    const at = (key: string): KeyPath => ['error_model', 'observers', i, key];
    if (names.indexOf(o.name) !== i) fail(`observer ${o.name} is listed twice`, ['error_model', 'observers', i, 'name']);
    if (o.assessment.length !== k || o.assessment.some((row) => row.length !== k)) fail(`not ${k}×${k}`, at('assessment'));
    if (o.probabilities.length !== k || o.probabilities.some((row) => row.length !== k)) fail(`not ${k}×${k}`, at('probabilities'));
    assessments.set(o.assessment.flat(), i * kk);
    const e = Float64Array.from(o.probabilities.flat());
    checkStochastic(e, k, (c) => pooled[c] === 0, at('probabilities'), fail);
    probabilities.set(e, i * kk);
    for (let c = 0; c < kk; c++) sum[c] += assessments[i * kk + c]!;
  });
  for (let c = 0; c < kk; c++) {
    if (sum[c] !== pooled[c]) fail('the observers\' assessments do not add up to the pooled assessment', ['error_model', 'assessment', Math.floor(c / k), c % k]);
  }
  const model: ObserverMatrices = {
    names, assessments, unassessed: m.pooled_for ?? [], pooledSurveys: m.pooled_surveys ?? 0, notSurveyed: m.not_surveyed ?? [],
  };
  return { model, probabilities };
}

/**
 * The sampler's error-model sweeps: an error matrix per retained sweep (stochastic rows, zero off
 * the assessment's cells), the true latest counts (whole, the same total every sweep), and the
 * diagnostics grids.
 */
export function checkErrorSweeps(f: FitFile, k: number, model: ErrorModel, fail: Fail): ErrorSweeps {
  const s = f.posterior_sampler!;
  const path = (key: string, ...rest: (string | number)[]): KeyPath => ['posterior_sampler', key, ...rest];
  if (!s.error_matrices || !s.latest_true_counts || !s.error_rhat || !s.error_ess) {
    fail('a fit with observer error keeps error_matrices, latest_true_counts, error_rhat and error_ess', ['posterior_sampler']);
  }
  if (s.error_matrices!.length !== s.retained) fail(`${s.error_matrices!.length} error matrices, not retained = ${s.retained}`, path('error_matrices'));
  if (s.latest_true_counts!.length !== s.retained) fail(`${s.latest_true_counts!.length} latest counts, not retained = ${s.retained}`, path('latest_true_counts'));
  const emissions = new Float64Array(s.retained * k * k);
  s.error_matrices!.forEach((e, r) => {
    if (e.length !== k * k) fail(`an error matrix has ${e.length} cells, not ${k * k}`, path('error_matrices', r));
    const matrix = Float64Array.from(e);
    checkStochastic(matrix, k, (c) => model.assessment[c] === 0, path('error_matrices', r), fail);
    emissions.set(matrix, r * k * k);
  });
  const latest = new Float64Array(s.retained * k);
  let total = -1;
  s.latest_true_counts!.forEach((counts, r) => {
    const sum = counts.reduce((a, b) => a + b, 0);
    if (counts.length !== k || sum === 0 || (total >= 0 && sum !== total)) fail(`not ${k} counts of the same sites as every other sweep`, path('latest_true_counts', r));
    total = sum;
    latest.set(counts, r * k);
  });
  const grid = (rows: (number | null)[][], key: string): Float64Array => {
    if (rows.length !== k || rows.some((row) => row.length !== k)) fail(`${key} is not ${k}×${k}`, path(key));
    return Float64Array.from(rows.flat(), (x) => (x === null ? Number.NaN : x));
  };
  const observers = model.observers ? checkObserverSweeps(s, k, model, fail) : undefined;
  return { emissions, latest, rhat: grid(s.error_rhat!, 'error_rhat'), ess: grid(s.error_ess!, 'error_ess'), ...(observers ? { observers } : {}) };
}

/** Each observer's matrix per retained sweep (stochastic, zero off the support) and its diagnostics grids. */
function checkObserverSweeps(s: NonNullable<FitFile['posterior_sampler']>, k: number, model: ErrorModel, fail: Fail): NonNullable<ErrorSweeps['observers']> {
  const path = (key: string, ...rest: (string | number)[]): KeyPath => ['posterior_sampler', key, ...rest];
  const count = model.observers!.names.length;
  const kk = k * k;
  if (!s.observer_error_matrices || !s.observer_error_rhat || !s.observer_error_ess) {
    fail('a fit with one error matrix per observer keeps observer_error_matrices, observer_error_rhat and observer_error_ess', ['posterior_sampler']);
  }
  if (s.observer_error_matrices!.length !== s.retained) fail(`${s.observer_error_matrices!.length} sweeps of observer matrices, not retained = ${s.retained}`, path('observer_error_matrices'));
  const emissions = new Float64Array(s.retained * count * kk);
  s.observer_error_matrices!.forEach((sweep, r) => {
    if (sweep.length !== count) fail(`${sweep.length} observer matrices, not ${count}`, path('observer_error_matrices', r));
    sweep.forEach((e, m) => {
      if (e.length !== kk) fail(`an error matrix has ${e.length} cells, not ${kk}`, path('observer_error_matrices', r, m));
      const matrix = Float64Array.from(e);
      checkStochastic(matrix, k, (c) => model.assessment[c] === 0, path('observer_error_matrices', r, m), fail);
      emissions.set(matrix, (r * count + m) * kk);
    });
  });
  const grids = (rows: (number | null)[][][], key: string): Float64Array => {
    if (rows.length !== count || rows.some((g) => g.length !== k || g.some((row) => row.length !== k))) fail(`${key} is not ${count} grids of ${k}×${k}`, path(key));
    return Float64Array.from(rows.flat(2), (x) => (x === null ? Number.NaN : x));
  };
  return { emissions, rhat: grids(s.observer_error_rhat!, 'observer_error_rhat'), ess: grids(s.observer_error_ess!, 'observer_error_ess') };
}

/** Rows non-negative summing to 1, and zero where `zero(cell)`. */
function checkStochastic(m: Float64Array, k: number, zero: (cell: number) => boolean, path: KeyPath, fail: Fail): void {
  for (let i = 0; i < k; i++) {
    let total = 0;
    for (let j = 0; j < k; j++) {
      const x = m[i * k + j]!;
      if (zero(i * k + j) && x !== 0) fail('a cell the model holds impossible is not 0', [...path, i, j]);
      total += x;
    }
    if (Math.abs(total - 1) > ROW_SUM_TOLERANCE) fail(`row ${i} sums to ${total}, not 1`, [...path, i]);
  }
}
