import { SereError, quote } from '../errors.js';
import { LabelColumn } from './label-column.js';
import { labelProblem } from './labels.js';
import { orderRows } from './order-rows.js';
import { RowStore } from './row-store.js';
import type { RowSink } from './row-sink.js';
import { StateLabels } from './states.js';
import { columnIndex, type ColumnIndex } from './survey-header.js';
import type { ReadSurveyOptions } from './read-survey-csv.js';
import type { SurveyTable } from './survey.js';
import { parseDate, parseTime, TIME_EMPTY, TIME_NOT_DATE, TIME_NOT_WHOLE, TIME_UNSAFE } from './parse-time.js';
import { roundToSeasons } from './seasons.js';

/**
 * The order in which problems are reported: the order of the checks when each ran over the whole
 * table before the next began (CSV syntax, header, site and group labels, then row by row empty
 * values and times, then state labels), so a table with several problems gets the same message
 * as before the reading streamed. Within a stage the first problem in the file wins.
 */
const PARSE = 0;
const HEADER = 1;
const LABEL = 2;
const VALUE = 3;
const STATE = 4;

/**
 * Validate survey rows as they stream past and keep them in typed arrays (RowStore): one pass,
 * no object per row. Each check runs only while no earlier-ranked problem is known; once any
 * problem is known, rows are no longer kept (the table will be refused).
 */
export class SurveyCollector implements RowSink {
  private error: SereError | undefined;
  private stage = Infinity;
  private header: readonly string[] | undefined;
  private headerLine = 0;
  private index: ColumnIndex | undefined;
  private bodyRows = 0;
  private readonly sites: LabelColumn;
  private readonly stateLabels: LabelColumn;
  private readonly groups: LabelColumn;
  private stateIds = new Int16Array(64).fill(-1);
  private readonly states: StateLabels;
  private readonly store: RowStore;

  constructor(private readonly file: string, private readonly options: ReadSurveyOptions, private readonly trim: boolean) {
    this.sites = new LabelColumn(trim);
    this.stateLabels = new LabelColumn(trim);
    this.groups = new LabelColumn(trim);
    this.states = new StateLabels(file, options.states, options.partOfSeveral ? 1 : 2, options.statesPlace);
    this.store = new RowStore(options.columns.group !== undefined);
  }

  notCsv(error: SereError): void {
    this.fail(PARSE, error);
  }

  expect(records: number): void {
    if (this.stage === Infinity) this.store.reserve(records);
  }

  row(bytes: Buffer, starts: Int32Array, ends: Int32Array, fields: number, line: number): void {
    if (this.header === undefined) {
      this.header = Array.from({ length: fields }, (_, n) => this.text(bytes, starts[n]!, ends[n]!));
      this.headerLine = line;
      try {
        this.index = columnIndex(this.file, this.header, line, this.options.columns);
      } catch (err) {
        if (!(err instanceof SereError)) throw err;
        this.fail(HEADER, err);
      }
      return;
    }
    const index = this.index;
    if (index === undefined) return;
    this.bodyRows += 1;
    if (this.stage <= LABEL) return;

    // Site and group ids in NFC, and free of invisible characters (states are checked with their look-alikes).
    const knownSites = this.sites.labels.length;
    const site = this.sites.id(bytes, starts[index.site]!, ends[index.site]!);
    if (site === knownSites) this.checkLabel('site', this.sites.labels[site]!, line, index.site);
    const state = this.stateLabels.id(bytes, starts[index.state]!, ends[index.state]!);
    let group = 0;
    if (index.group !== undefined) {
      const knownGroups = this.groups.labels.length;
      group = this.groups.id(bytes, starts[index.group]!, ends[index.group]!);
      if (group === knownGroups) this.checkLabel('group', this.groups.labels[group]!, line, index.group);
    }
    if (this.stage <= VALUE) return;

    const time = (this.options.dates ? parseDate : parseTime)(bytes, starts[index.time]!, ends[index.time]!, this.trim);
    const empty = this.sites.labels[site] === '' ? 'site' : time.status === TIME_EMPTY ? 'time'
      : this.stateLabels.labels[state] === '' ? 'state' : undefined;
    if (empty !== undefined) {
      const at = index[empty];
      this.fail(VALUE, new SereError('EMPTY_VALUE', `empty ${empty} in column ${at + 1} (${quote(this.header[at]!)})`,
        { file: this.file, line, column: at + 1 }, `fill in the ${empty} or remove the row`));
      return;
    }
    if (time.status === TIME_NOT_DATE) {
      this.fail(VALUE, new SereError('BAD_TIME', `time ${quote(time.text)} in column ${index.time + 1} is not a date written YYYY-MM-DD`,
        { file: this.file, line, column: index.time + 1 }, 'write survey dates as 2024-08-15, or give --step as a number of time units for whole-number times'));
      return;
    }
    if (time.status === TIME_NOT_WHOLE) {
      this.fail(VALUE, new SereError('BAD_TIME', `time ${quote(time.text)} in column ${index.time + 1} is not a whole number`,
        { file: this.file, line, column: index.time + 1 }, /^\d{4}-\d{2}-\d{2}$/.test(time.text)
          ? 'for survey dates give the step in years: --step 1y (fit: { step: 1y } in a scenario)'
          : 'write survey times as integers such as 2024'));
      return;
    }
    if (time.status === TIME_UNSAFE) {
      // Beyond 2^53 a double cannot hold every integer: 9007199254740993 would be read as …992.
      this.fail(VALUE, new SereError('BAD_TIME', `time ${quote(time.text)} in column ${index.time + 1} is beyond ±${Number.MAX_SAFE_INTEGER}, the largest whole number sere counts exactly`,
        { file: this.file, line, column: index.time + 1 }, 'write survey times as years, or count from a nearer origin (e.g. days since 2000-01-01)'));
      return;
    }
    if (this.stage <= STATE) return;

    let stateId = state < this.stateIds.length ? this.stateIds[state]! : -1;
    if (stateId < 0) {
      try {
        stateId = this.states.see(this.stateLabels.labels[state]!, line, index.state + 1);
      } catch (err) {
        if (!(err instanceof SereError)) throw err;
        this.fail(STATE, err);
        return;
      }
      if (state >= this.stateIds.length) {
        const grown = new Int16Array(Math.max(this.stateIds.length * 2, state + 1)).fill(-1);
        grown.set(this.stateIds);
        this.stateIds = grown;
      }
      this.stateIds[state] = stateId;
    }
    if (this.stage === Infinity) this.store.push(site, time.value, stateId, line, group);
  }

  /** The validated table, or the first-ranked problem. */
  table(sha256: string): SurveyTable {
    const file = this.file;
    if (this.header === undefined) {
      throw this.error ?? new SereError('EMPTY_FILE', 'the survey table is empty', { file },
        'add a header row (site,time,state) and one row per site and survey');
    }
    if (this.error && this.stage <= HEADER) throw this.error;
    if (this.bodyRows === 0) {
      throw new SereError('EMPTY_FILE', 'the survey table has a header but no survey rows', { file, line: this.headerLine },
        'add one row per site and survey below the header');
    }
    if (this.error) throw this.error;
    const { states, index: stateIndex } = this.states.finish();

    const { sorted: sites, rank } = this.sites.ranks();
    const store = this.store;
    for (let n = 0; n < store.count; n++) {
      store.site[n] = rank[store.site[n]!]!;
      store.state[n] = stateIndex[store.state[n]!]!;
    }
    const seasons = this.options.dates ? roundToSeasons(store.time, store.line, store.count) : undefined;
    const ordered = orderRows(store, sites.length);
    if (ordered.conflict) {
      // A site surveyed twice at one time must agree with itself; an exact repeat is used once.
      const { first, later } = ordered.conflict;
      throw new SereError('DUPLICATE_SURVEY',
        `site ${quote(sites[later.site]!)} at time ${later.time} is ${quote(states[later.state]!)} here but ${quote(states[first.state]!)} on line ${first.line}`,
        { file, line: later.line }, 'keep one of the two rows');
    }
    return {
      file, states, sites, rows: ordered.rows, repeatedRows: ordered.repeated, sha256,
      ...(this.index?.group !== undefined ? { groups: this.groups.labels } : {}),
      ...(seasons ? { seasons } : {}),
    };
  }

  private checkLabel(role: 'site' | 'group', label: string, line: number, at: number): void {
    const problem = labelProblem(label, () => `${role} ${quote(label)}`);
    if (problem) this.fail(LABEL, new SereError(problem.code, problem.what, { file: this.file, line, column: at + 1 }, problem.hint));
  }

  private text(bytes: Buffer, start: number, end: number): string {
    const text = bytes.toString('utf8', start, end);
    return this.trim ? text.trim() : text;
  }

  private fail(stage: number, error: SereError): void {
    if (stage < this.stage) {
      this.stage = stage;
      this.error = error;
    }
  }
}
