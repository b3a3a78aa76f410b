import { csvRecords } from './read-csv-records.js';
import { SereError, quote, type Place } from '../errors.js';
import { labelProblem, lookAlikeKey, normaliseLabel } from './labels.js';
import type { LabelMap } from './label-map.js';
import { readTextFile } from './read-text-file.js';
import { settingName } from '../setting-name.js';

/**
 * An accuracy assessment (an error matrix, Congalton 1991; Olofsson et al. 2014): how often sites
 * whose true state was verified (a second, careful visit, a plot re-measured, a photo checked) had
 * been recorded as each state. Counts, row = verified (true) state, column = recorded state, k × k
 * in the survey's state order.
 */
export interface ErrorMatrix {
  readonly file: string;
  readonly sha256: string;
  /** k × k, row = verified (true) state, column = recorded state. */
  readonly counts: Float64Array;
  /** Rows left out because the label map sends one of their labels to skip. */
  readonly droppedRows: number;
  /**
   * With an `observer` column: the observers in order of first appearance, each one's counts
   * (observers × k × k, same orientation; `counts` is then their sum, the pooled matrix) and the
   * line each is first named on.
   */
  readonly observers?: AssessedObservers;
}

export interface AssessedObservers {
  readonly names: readonly string[];
  readonly counts: Float64Array;
  readonly lines: readonly number[];
}

/** The optional column naming who made each assessed record: one error matrix per observer. */
export const OBSERVER_COLUMN = 'observer';

/** The three columns of the one format accepted: long, one row per (recorded, verified) cell. */
export const ERROR_MATRIX_COLUMNS = ['recorded', 'verified', 'n'] as const;

const WHAT = 'error matrix';
const HINT = 'write the error matrix as a CSV with columns recorded,verified,n: one row per cell, n sites recorded as one state and verified as another';

/**
 * Read an error matrix in its one accepted form, a long CSV with columns `recorded,verified,n` (in
 * any order, other columns refused): each row says n assessed sites were recorded as `recorded`
 * and verified as `verified`. A long table needs no orientation — each cell names both states —
 * which is why the square form (where rows and columns are easily swapped) is not accepted.
 * Missing cells are 0. Labels are survey labels: trimmed, NFC, through the same label map, and
 * must name a state of the fit.
 *
 * Refused, each with file, line and column: an unknown label, a count that is not a whole number
 * ≥ 0, a (recorded, verified) cell given twice, no rows, and a state never verified (its row of
 * the error matrix would rest on the prior alone: assess some sites of every state, or merge it).
 */
export function readErrorMatrix(file: string, states: readonly string[], labels?: LabelMap): ErrorMatrix {
  const { text, sha256 } = readTextFile(file, WHAT);
  const records = csvRecords(file, text, HINT);
  if (records.length === 0) throw new SereError('EMPTY_FILE', 'the error matrix is empty', { file }, HINT);
  const header = records[0]!.record.map(normaliseLabel);
  const headerLine = records[0]!.info.lines;
  header.forEach((name, c) => {
    if (!(ERROR_MATRIX_COLUMNS as readonly string[]).includes(name) && name !== OBSERVER_COLUMN) {
      throw new SereError('BAD_ERROR_MATRIX', `unexpected column ${quote(name)}`, { file, line: headerLine, column: c + 1 }, HINT);
    }
    if (header.indexOf(name) !== c) {
      throw new SereError('DUPLICATE_COLUMN', `column ${quote(name)} appears twice`, { file, line: headerLine, column: c + 1 }, HINT);
    }
  });
  const missing = ERROR_MATRIX_COLUMNS.filter((name) => !header.includes(name));
  if (missing.length) {
    throw new SereError('MISSING_COLUMN', `no ${missing.map(quote).join(', ')} column${missing.length > 1 ? 's' : ''}`, { file, line: headerLine }, HINT);
  }
  const k = states.length;
  const index = new Map(states.map((s, i) => [s, i] as const));
  const col = { recorded: header.indexOf('recorded'), verified: header.indexOf('verified'), n: header.indexOf('n'), observer: header.indexOf(OBSERVER_COLUMN) };
  const counts = new Float64Array(k * k);
  const observers = col.observer >= 0 ? new ObserverNames(file, col.observer + 1) : undefined;
  const observerCounts: Float64Array[] = [];
  const cellLine = new Map<number, number>();
  let droppedRows = 0;
  let rows = 0;
  for (const { record, info } of records.slice(1)) {
    const line = info.lines;
    const place = (name: keyof typeof col): Place => ({ file, line, column: col[name] + 1 });
    /** The state index of a label, -1 when the label map skips it. */
    const state = (name: 'recorded' | 'verified'): number => {
      const raw = normaliseLabel(record[col[name]]!);
      if (raw === '') throw new SereError('EMPTY_VALUE', `${name} is empty`, place(name), HINT);
      const target = labels?.targets.get(raw);
      if (target === null) return -1;
      const label = target ?? raw;
      const i = index.get(label);
      if (i === undefined) {
        throw new SereError('UNKNOWN_STATE', `${name} state ${quote(label)} is not a state of the survey (${states.map(quote).join(', ')})`, place(name),
          labels ? `map ${quote(raw)} to a state in ${labels.file}, or correct the row` : `spell it as the survey does, or give the label map with ${settingName('--labels', 'fit.labels')}`);
      }
      return i;
    };
    const nText = normaliseLabel(record[col.n]!);
    const n = nText === '' ? Number.NaN : Number(nText);
    if (!Number.isSafeInteger(n) || n < 0) {
      throw new SereError('BAD_ERROR_MATRIX', `n ${quote(nText)} is not a whole number of sites (0 or more)`, place('n'), HINT);
    }
    const recorded = state('recorded');
    const verified = state('verified');
    const observer = observers ? observers.id(record[col.observer]!, line) : 0;
    if (recorded < 0 || verified < 0) {
      droppedRows += 1;
      continue;
    }
    const cell = verified * k + recorded;
    const first = cellLine.get(observer * k * k + cell);
    if (first !== undefined) {
      throw new SereError('DUPLICATE_KEY', `recorded ${quote(states[recorded]!)}, verified ${quote(states[verified]!)}${observers ? ` by ${quote(observers.names[observer]!)}` : ''} is given twice (first on line ${first})`,
        { file, line }, 'keep one row per cell, with the counts added up');
    }
    cellLine.set(observer * k * k + cell, line);
    counts[cell] += n;
    if (observers) (observerCounts[observer] ??= new Float64Array(k * k))[cell] = n;
    rows += 1;
  }
  if (rows === 0) throw new SereError('EMPTY_FILE', 'the error matrix has a header but no rows', { file }, HINT);
  for (let x = 0; x < k; x++) {
    let total = 0;
    for (let r = 0; r < k; r++) total += counts[x * k + r]!;
    if (total === 0) {
      throw new SereError('STATE_NEVER_VERIFIED', `no assessed site was verified as ${quote(states[x]!)}, so how often it is recorded wrongly is unknown`,
        { file }, `verify some sites found in ${quote(states[x]!)} and add their rows (verified ${quote(states[x]!)})`);
    }
  }
  if (!observers) return { file, sha256, counts, droppedRows };
  const names = observers.names;
  const perObserver = new Float64Array(names.length * k * k);
  names.forEach((_, o) => { if (observerCounts[o]) perObserver.set(observerCounts[o]!, o * k * k); });
  return { file, sha256, counts, droppedRows, observers: { names, counts: perObserver, lines: observers.lines } };
}

/**
 * The observers named in an assessment, numbered in order of first appearance. A name is trimmed
 * and NFC like a label; an empty cell is refused (whose matrix would it be?), and so is a name that
 * is another one typed differently — the same after case folding, look-alike letters and runs of
 * white space (`observerKey`) — since it would silently become an observer of its own.
 */
class ObserverNames {
  readonly names: string[] = [];
  readonly lines: number[] = [];
  private readonly ids = new Map<string, number>();
  private readonly keys = new Map<string, number>();

  constructor(private readonly file: string, private readonly column: number) {}

  id(raw: string, line: number): number {
    const name = normaliseLabel(raw);
    const place = { file: this.file, line, column: this.column };
    if (name === '') throw new SereError('EMPTY_VALUE', 'observer is empty', place, 'name the observer who made these records, or drop the observer column to pool every observer');
    const known = this.ids.get(name);
    if (known !== undefined) return known;
    const problem = labelProblem(name, () => `observer ${quote(name)}`);
    if (problem) throw new SereError(problem.code, problem.what, place, problem.hint);
    const key = observerKey(name);
    const clash = this.keys.get(key);
    if (clash !== undefined) {
      throw new SereError('OBSERVER_LOOK_ALIKE', `observer ${quote(name)} looks like ${quote(this.names[clash]!)} (line ${this.lines[clash]}) but is spelled differently`,
        place, 'spell each observer\'s name the same way on every row');
    }
    const id = this.names.length;
    this.names.push(name);
    this.lines.push(line);
    this.ids.set(name, id);
    this.keys.set(key, id);
    return id;
  }
}

/**
 * Two observer names with the same key are probably one person typed two ways: the label
 * look-alike key (case, compatibility forms, look-alike letters; labels.ts) with runs of white space
 * made one space.
 */
export function observerKey(name: string): string {
  return lookAlikeKey(name).replace(/\s+/gu, ' ');
}
