import type { KeyPath } from '../data/read-structured.js';
import type { ErrorEstimate } from '../chain/error-em.js';
import type { FitFile } from './fit-file-schema.js';
import type { ErrorModel } from './error-model.js';
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
    p, emission, initial: Float64Array.from(m.initial), expected, rowsFromPrior, rowsNeverLeft,
    logLikelihood: f.estimation!.log_likelihood, iterations: f.estimation!.iterations, converged: f.estimation!.converged,
  };
  return { file: m.file, sha256: m.sha256, assessment, droppedRows: m.dropped_rows, mle, trueTransitions: m.true_transitions };
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
  return { emissions, latest, rhat: grid(s.error_rhat!, 'error_rhat'), ess: grid(s.error_ess!, 'error_ess') };
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
