import { recordPatterns, patternLength, type RecordPatterns } from '../chain/record-patterns.js';
import { readErrorMatrix } from '../data/read-error-matrix.js';
import type { SurveyTable } from '../data/survey.js';
import { SereError, quote } from '../errors.js';
import { errorSupport, type ErrorModel } from './error-model.js';
import { labelMapAt, type FitSettings } from './settings.js';
import { observerMatrices } from './observer-matrices.js';

/**
 * Observer error needs each site's own sequence of records: refused, naming the flag or key, where
 * the input has none (a counts table, a raster stack) or where it is not carried yet (a workspace).
 */
export function refuseErrors(settings: FitSettings, what: string, hint = 'fit the survey table itself with the error matrix'): void {
  if (settings.errors === undefined) return;
  throw new SereError('BAD_OPTION', `observer error needs each site's records in order, and ${what}`, settings.places?.errors ?? { path: '--errors' }, hint);
}

/**
 * The error model of a survey table's fit: the error matrix read against the table's states
 * (through the same label map), one matrix per observer when it names observers
 * (observer-matrices.ts), each site's record pooled by pattern, and every record checked to be
 * possible under the model's structural zeros.
 */
export function errorModelOf(table: SurveyTable, settings: FitSettings, mask: Uint8Array): ErrorModel {
  const file = settings.errors!;
  const labels = settings.labels !== undefined ? labelMapAt(settings.labels, settings.places?.labels ?? { path: '--labels' }) : undefined;
  let matrix;
  try {
    matrix = readErrorMatrix(file, table.states, labels);
  } catch (err) {
    // A missing file is named with the flag or key that named it.
    if (err instanceof SereError && (err.code === 'FILE_NOT_FOUND' || err.code === 'NOT_A_FILE')) {
      throw new SereError(err.code, err.message, { file, path: settings.places?.errors?.path ?? '--errors' }, err.hint);
    }
    throw err;
  }
  const { observers, matrixOfObserver } = observerMatrices(table, matrix);
  const records = recordPatterns(table.rows, settings.step, matrixOfObserver);
  let trueTransitions = 0;
  for (let q = 0; q < records.count; q++) trueTransitions += records.sites[q]! * (patternLength(records, q) - 1 + Math.max(0, records.extend[q]!));
  const model: ErrorModel = {
    file, sha256: matrix.sha256, assessment: matrix.counts, droppedRows: matrix.droppedRows, records, trueTransitions, ...(observers ? { observers } : {}),
  };
  checkRecordsPossible(records, errorSupport(model), mask, table);
  return model;
}

/**
 * With an error model, a record that breaks a declared-impossible transition is evidence that an
 * observer mislabelled a state, and the true path avoids it. A record no true path can explain —
 * every path through allowed transitions meets a survey whose recorded state its true state is
 * never recorded as (a cell the assessment never saw) — is refused at that survey's line.
 *
 * The forward recursion on the supports alone: a state is possible at step t when some possible
 * state at t−1 may move to it and, at a survey, it may be recorded as what was recorded.
 */
function checkRecordsPossible(records: RecordPatterns, support: Uint8Array, mask: Uint8Array, table: SurveyTable): void {
  const k = table.states.length;
  const now = new Uint8Array(k);
  const next = new Uint8Array(k);
  for (let q = 0; q < records.count; q++) {
    const T = patternLength(records, q);
    let s = records.start[q]!;
    now.fill(1);
    for (let t = 0; t < T; t++) {
      if (t > 0) {
        next.fill(0);
        for (let a = 0; a < k; a++) {
          if (!now[a]) continue;
          for (let b = 0; b < k; b++) if (!mask[a * k + b]) next[b] = 1;
        }
        now.set(next);
      }
      if (records.at[s] !== t) continue;
      const r = records.state[s]!;
      let any = false;
      for (let x = 0; x < k; x++) {
        now[x] = now[x]! && support[x * k + r]! ? 1 : 0;
        any ||= now[x] === 1;
      }
      if (!any) {
        throw new SereError('IMPOSSIBLE_RECORD',
          `a site recorded ${quote(table.states[r]!)} here, which no true path explains: the impossible transitions rule out every state it could have been in, and the error matrix never saw another state recorded as ${quote(table.states[r]!)}`,
          { file: table.file, line: records.line[s]! },
          `check this survey; if it may be a mislabelling, add the assessment rows that show it (recorded ${quote(table.states[r]!)}), or shorten the impossible list`);
      }
      s += 1;
    }
  }
}
