import { observerKey, type ErrorMatrix } from '../data/read-error-matrix.js';
import type { SurveyTable } from '../data/survey.js';
import { SereError, quote } from '../errors.js';
import type { ObserverMatrices } from './error-model.js';

/**
 * Which error matrix each surveyed observer's records go through, when the assessment names
 * observers (fit/error-model.ts: matrix 0 pooled, 1 + o assessed observer o):
 * - a surveyed observer the assessment names: that observer's own matrix;
 * - a surveyed observer it does not name: the pooled matrix (listed, for a warning);
 * - an assessed observer who made no survey: nothing to read, listed for a note;
 * - two surveyed names that are one typed differently, or a surveyed name that is an assessed one typed differently (case, look-alike letters, spaces;
 *   `observerKey`) is refused at its first survey's line: it would silently fall back on the
 *   pooled matrix while its own was meant.
 * Refused too: an assessment naming observers for a table without an observer column, or with an
 * empty observer cell (whose matrix would that survey use?). Without observers in the assessment, one shared matrix: a
 * table's observer column is then not used.
 */
export function observerMatrices(table: SurveyTable, matrix: ErrorMatrix):
  { observers?: ObserverMatrices; matrixOfObserver?: Int32Array } {
  const assessed = matrix.observers;
  if (!assessed) return {};
  const { rows, observers } = table;
  if (!rows.observer || !observers) {
    throw new SereError('MISSING_COLUMN', `the error matrix names observers (line ${assessed.lines[0]}), but the survey table has no observer column`,
      { file: table.file, line: 1 },
      'name the column saying who made each survey with --observer-column (fit.columns.observer), or drop the observer column of the error matrix to pool every observer');
  }
  const index = new Map(assessed.names.map((name, o) => [name, o] as const));
  const byKey = new Map(assessed.names.map((name, o) => [observerKey(name), o] as const));
  const firstLine = new Float64Array(observers.length).fill(Infinity);
  const surveys = new Float64Array(observers.length);
  for (let n = 0; n < rows.count; n++) {
    const o = rows.observer[n]!;
    surveys[o] += 1;
    firstLine[o] = Math.min(firstLine[o]!, rows.line[n]!);
  }
  const column = table.observerColumn?.column;
  observers.forEach((name, o) => {
    if (name !== '' || surveys[o] === 0) return;
    throw new SereError('EMPTY_VALUE', `empty observer${column ? ` in column ${column} (${quote(table.observerColumn!.name)})` : ''}, and the error matrix has one matrix per observer`,
      surveyPlace(table, firstLine[o]!),
      'name the observer who made this survey, or drop the error matrix\'s observer column to pool every observer');
  });
  checkSurveyedNames(table, surveys, firstLine);
  const matrixOfObserver = new Int32Array(observers.length);
  const unassessed: string[] = [];
  const surveyed = new Uint8Array(assessed.names.length);
  let pooledSurveys = 0;
  observers.forEach((name, o) => {
    if (surveys[o] === 0) return;
    const own = index.get(name);
    if (own !== undefined) {
      matrixOfObserver[o] = 1 + own;
      surveyed[own] = 1;
      return;
    }
    const near = byKey.get(observerKey(name));
    if (near !== undefined) {
      throw new SereError('OBSERVER_LOOK_ALIKE', `observer ${quote(name)} looks like ${quote(assessed.names[near]!)} of the error matrix (line ${assessed.lines[near]}) but is spelled differently`,
        surveyPlace(table, firstLine[o]!),
        `spell the observer as ${quote(assessed.names[near]!)} in both files`);
    }
    unassessed.push(name);
    pooledSurveys += surveys[o]!;
  });
  // The names sorted for a stable message; the matrices keep the assessment's order.
  unassessed.sort();
  return {
    observers: {
      names: assessed.names, assessments: assessed.counts, unassessed, pooledSurveys,
      notSurveyed: assessed.names.filter((_, o) => surveyed[o] === 0),
    },
    matrixOfObserver,
  };
}

/** A survey's line in the table, with the observer column when the table says where it is. */
function surveyPlace(table: SurveyTable, line: number): { file: string; line: number; column?: number } {
  const column = table.observerColumn?.column;
  return { file: table.file, line, ...(column ? { column } : {}) };
}

/** Two surveyed names that are one typed differently: refused at the later one's first line. */
function checkSurveyedNames(table: SurveyTable, surveys: Float64Array, firstLine: Float64Array): void {
  const names = table.observers!;
  const order = names.map((_, o) => o).filter((o) => surveys[o]! > 0).sort((a, b) => firstLine[a]! - firstLine[b]!);
  const seen = new Map<string, number>();
  for (const o of order) {
    const key = observerKey(names[o]!);
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      throw new SereError('OBSERVER_LOOK_ALIKE', `observer ${quote(names[o]!)} looks like ${quote(names[earlier]!)} (line ${firstLine[earlier]}) but is spelled differently`,
        surveyPlace(table, firstLine[o]!),
        'spell each observer\'s name the same way on every row');
    }
    seen.set(key, o);
  }
}
