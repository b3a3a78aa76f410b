import { SereError, quote } from '../errors.js';
import { LabelColumn } from './label-column.js';
import { labelProblem, normaliseLabel } from './labels.js';
import { orderRows } from './order-rows.js';
import { RowStore } from './row-store.js';
import type { RowSink } from './row-sink.js';
import { StateLabels } from './states.js';
import type { ColumnIndex } from './survey-header.js';
import { headerIndex, type HeaderIndex, type WideIndex } from './survey-layout.js';
import type { ReadSurveyOptions } from './read-survey-csv.js';
import type { SurveyTable } from './survey.js';
import { parseDate, parseTime, TIME_EMPTY, TIME_NOT_DATE, TIME_NOT_WHOLE, TIME_UNSAFE } from './parse-time.js';
import { roundToSeasons } from './seasons.js';
import { settingName } from '../setting-name.js';

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
const DUPLICATE = 5;

/** stateIds: a label not seen yet; one the label map skips; one the label map lacks. FAILED: refused. */
const NEW = -1;
const SKIP = -2;
const UNMAPPED = -3;
const FAILED = -4;

/** Unmapped labels listed in one message. */
const MAX_LISTED = 10;

/** A position as written: a decimal number, optionally signed, with an optional exponent. */
const COORDINATE = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** A time written as an ISO date (2024-05-17): the hint points to --step 1y, which reads them. */
const DATE = /^\d{4}-\d{2}-\d{2}$/;

function setGrown(a: Float64Array, at: number, value: number): Float64Array {
  let b = a;
  if (at >= a.length) {
    b = new Float64Array(Math.max(a.length * 2, at + 1));
    b.set(a);
  }
  b[at] = value;
  return b;
}

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
  private layout: HeaderIndex | undefined;
  /** Wide tables: the line of each site's row, to name both lines of a repeated site. */
  private siteLines: Float64Array = new Float64Array(1024);
  private readonly unmapped: { label: string; line: number; column: number }[] = [];
  private dropped = 0;
  /** Wide tables: cells holding a state (a table of empty cells has no survey, like a header alone). */
  private filledCells = 0;
  /** Declared states, as labels: with a label map, a label spelled as one needs no entry. */
  private readonly declared: ReadonlySet<string>;
  private bodyRows = 0;
  private readonly sites: LabelColumn;
  private readonly stateLabels: LabelColumn;
  private readonly groups: LabelColumn;
  private readonly observers: LabelColumn;
  private stateIds = new Int16Array(64).fill(-1);
  private readonly states: StateLabels;
  private readonly store: RowStore;
  /** With x and y columns: each site label's position and the line it was first given on (NaN: not yet). */
  private positions: Float64Array | undefined;
  private positionLines: Float64Array | undefined;

  /** `lineWord`: what a record's number is called in messages — a CSV line, or a worksheet's row. */
  constructor(private readonly file: string, private readonly options: ReadSurveyOptions, private readonly trim: boolean,
    private readonly lineWord: 'line' | 'row' = 'line') {
    this.sites = new LabelColumn(trim);
    this.stateLabels = new LabelColumn(trim);
    this.groups = new LabelColumn(trim);
    this.observers = new LabelColumn(trim);
    this.states = new StateLabels(file, options.states, options.partOfSeveral ? 1 : 2, options.statesPlace);
    this.store = new RowStore(options.columns.group !== undefined, options.columns.observer !== undefined || options.detectObserver === true);
    this.declared = new Set((options.states ?? []).map((s) => normaliseLabel(s.trim())));
    if (options.columns.x !== undefined) {
      this.positions = new Float64Array(2048).fill(Number.NaN);
      this.positionLines = new Float64Array(1024);
    }
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
        this.layout = headerIndex(this.file, this.header, line, this.options.columns, this.options.layout, this.options.detectObserver);
        if (this.layout.layout === 'wide' && this.options.dates) {
          throw new SereError('BAD_OPTION', 'a wide table is headed by survey times, not dates: --step 1y reads dates in a long table\'s time column',
            { file: this.file, line }, `head the columns by survey year and give the step as a number: ${settingName('--step 1', 'fit.step: 1')}`);
        }
      } catch (err) {
        if (!(err instanceof SereError)) throw err;
        this.fail(HEADER, err);
      }
      return;
    }
    const layout = this.layout;
    if (layout === undefined) return;
    this.bodyRows += 1;
    if (this.stage <= LABEL) return;
    if (layout.layout === 'long') this.longRow(bytes, starts, ends, line, layout.index);
    else this.wideRow(bytes, starts, ends, fields, line, layout.index);
  }

  /** One survey: site, time, state (and group). */
  private longRow(bytes: Buffer, starts: Int32Array, ends: Int32Array, line: number, index: ColumnIndex): void {
    // Site and group ids in NFC, and free of invisible characters (states are checked with their look-alikes).
    const site = this.siteOf(bytes, starts, ends, line, index.site);
    const state = this.stateLabels.id(bytes, starts[index.state]!, ends[index.state]!);
    const group = this.groupOf(bytes, starts, ends, line, index.group);
    const observer = this.observerOf(bytes, starts, ends, line, index.observer);
    if (this.stage <= VALUE) return;

    const time = (this.options.dates ? parseDate : parseTime)(bytes, starts[index.time]!, ends[index.time]!, this.trim);
    const empty = this.sites.labels[site] === '' ? 'site' : time.status === TIME_EMPTY ? 'time'
      : this.stateLabels.labels[state] === '' ? 'state' : undefined;
    if (empty !== undefined) {
      this.emptyValue(empty, index[empty], line);
      return;
    }
    if (time.status === TIME_NOT_DATE) {
      this.fail(VALUE, new SereError('BAD_TIME', `time ${quote(time.text)} in column ${index.time + 1} is not a date written YYYY-MM-DD`,
        { file: this.file, line, column: index.time + 1 }, `write survey dates as 2024-08-15, or give the step as a number of time units for whole-number times: ${settingName('--step 1', 'fit.step: 1')}`));
      return;
    }
    if (time.status === TIME_NOT_WHOLE) {
      this.fail(VALUE, new SereError('BAD_TIME', `time ${quote(time.text)} in column ${index.time + 1} is not a whole number`,
        { file: this.file, line, column: index.time + 1 }, DATE.test(time.text)
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
    if (index.x !== undefined && !this.position(bytes, starts, ends, line, site, index.x, index.y!)) return;
    if (this.stage <= STATE) return;
    // The cached id inline (most rows): the call is for a label's first row, or a skipped one.
    const cached = state < this.stateIds.length ? this.stateIds[state]! : NEW;
    const stateId = cached >= 0 ? cached : this.stateIdOf(state, line, index.state);
    if (stateId >= 0 && this.stage === Infinity) this.store.push(site, time.value, stateId, line, group, observer);
  }

  /**
   * One site: its surveys are the non-empty cells of the time columns, each at the time its column
   * is headed by. A site's second row is an error naming both lines (which row holds the truth?).
   */
  private wideRow(bytes: Buffer, starts: Int32Array, ends: Int32Array, fields: number, line: number, index: WideIndex): void {
    const knownSites = this.sites.labels.length;
    const site = this.siteOf(bytes, starts, ends, line, index.site);
    const group = this.groupOf(bytes, starts, ends, line, index.group);
    if (site === knownSites) this.siteLines = setGrown(this.siteLines, site, line);
    if (this.stage <= VALUE) return;

    if (this.sites.labels[site] === '') {
      this.emptyValue('site', index.site, line);
      return;
    }
    for (let c = 0; c < fields; c++) {
      if (Number.isNaN(index.times[c]!) && c !== index.site && c !== index.group && c !== index.x && c !== index.y && this.text(bytes, starts[c]!, ends[c]!) !== '') {
        this.fail(VALUE, new SereError('BAD_CELL', `a value under column ${c + 1}, which has no header`, { file: this.file, line, column: c + 1 },
          'head the column with its survey time, or delete the value'));
        return;
      }
    }
    if (site !== knownSites) {
      this.fail(DUPLICATE, new SereError('DUPLICATE_SITE', `site ${quote(this.sites.labels[site]!)} has a second row here (the first is ${this.lineWord} ${this.siteLines[site]})`,
        { file: this.file, line, column: index.site + 1 }, 'a wide table has one row per site: merge the two rows into one'));
    }
    if (index.x !== undefined && !this.position(bytes, starts, ends, line, site, index.x, index.y!)) return;
    if (this.stage <= STATE) return;
    for (let c = 0; c < fields; c++) {
      const time = index.times[c]!;
      if (Number.isNaN(time)) continue;
      const state = this.stateLabels.id(bytes, starts[c]!, ends[c]!);
      // An empty cell: this site was not surveyed at this time.
      if (this.stateLabels.labels[state] === '') continue;
      this.filledCells += 1;
      const stateId = this.stateIdOf(state, line, c);
      if (stateId === FAILED) return;
      if (stateId >= 0 && this.stage === Infinity) this.store.push(site, time, stateId, line, group);
    }
  }

  private siteOf(bytes: Buffer, starts: Int32Array, ends: Int32Array, line: number, at: number): number {
    const known = this.sites.labels.length;
    const site = this.sites.id(bytes, starts[at]!, ends[at]!);
    if (site === known) this.checkLabel('site', this.sites.labels[site]!, line, at);
    return site;
  }

  /**
   * The observer's id (0 without an observer column); a new name is checked like a site id. An
   * empty cell is kept as the name '' here: it is refused only where observers are used, when the
   * error matrix names observers (fit/observer-matrices.ts) — the column may be read without being
   * used (an error matrix without observers), and then an empty cell is no problem.
   */
  private observerOf(bytes: Buffer, starts: Int32Array, ends: Int32Array, line: number, at: number | undefined): number {
    if (at === undefined) return 0;
    const known = this.observers.labels.length;
    const observer = this.observers.id(bytes, starts[at]!, ends[at]!);
    if (observer === known && this.observers.labels[observer] !== '') this.checkLabel('observer', this.observers.labels[observer]!, line, at);
    return observer;
  }

  private groupOf(bytes: Buffer, starts: Int32Array, ends: Int32Array, line: number, at: number | undefined): number {
    if (at === undefined) return 0;
    const known = this.groups.labels.length;
    const group = this.groups.id(bytes, starts[at]!, ends[at]!);
    if (group === known) this.checkLabel('group', this.groups.labels[group]!, line, at);
    return group;
  }

  /**
   * A row's position (x, y columns): both must be numbers, and every row of a site must give the
   * same one — a site in two places is an error naming both lines. False when a coordinate is refused.
   */
  private position(bytes: Buffer, starts: Int32Array, ends: Int32Array, line: number, site: number, xAt: number, yAt: number): boolean {
    const x = this.coordinate(bytes, starts, ends, line, xAt, 'x');
    const y = Number.isNaN(x) ? x : this.coordinate(bytes, starts, ends, line, yAt, 'y');
    if (Number.isNaN(y)) return false;
    if (2 * site + 1 >= this.positions!.length) {
      const grown = new Float64Array(Math.max(this.positions!.length * 2, 2 * site + 2)).fill(Number.NaN);
      grown.set(this.positions!);
      this.positions = grown;
    }
    const known = this.positions![2 * site]!;
    if (Number.isNaN(known)) {
      this.positions![2 * site] = x;
      this.positions![2 * site + 1] = y;
      this.positionLines = setGrown(this.positionLines!, site, line);
      return true;
    }
    if (known !== x || this.positions![2 * site + 1] !== y) {
      this.fail(DUPLICATE, new SereError('SITE_MOVED',
        `site ${quote(this.sites.labels[site]!)} is at (${x}, ${y}) here but at (${known}, ${this.positions![2 * site + 1]}) on ${this.lineWord} ${this.positionLines![site]}`,
        { file: this.file, line, column: xAt + 1 }, 'a site has one position: correct the coordinates on one of the two rows'));
      // Ranked with the duplicates, last: the row's state is still checked.
    }
    return true;
  }

  /** One coordinate as a finite number, or NaN with the problem kept. */
  private coordinate(bytes: Buffer, starts: Int32Array, ends: Int32Array, line: number, at: number, axis: 'x' | 'y'): number {
    const text = this.text(bytes, starts[at]!, ends[at]!);
    if (text === '') {
      this.fail(VALUE, new SereError('EMPTY_VALUE', `empty ${axis} coordinate in column ${at + 1} (${quote(this.header![at]!)})`,
        { file: this.file, line, column: at + 1 }, `give every row its site's ${axis} coordinate, or drop --${axis}-column`));
      return Number.NaN;
    }
    const value = COORDINATE.test(text) ? Number(text) : Number.NaN;
    if (!Number.isFinite(value)) {
      this.fail(VALUE, new SereError('BAD_COORDINATE', `${axis} coordinate ${quote(text)} in column ${at + 1} is not a number`,
        { file: this.file, line, column: at + 1 },
        text.includes(',') ? 'write the decimal point as a dot (1234.5)' : 'write positions as numbers in projected units (metres east and north), e.g. 431250.5'));
      return Number.NaN;
    }
    return value;
  }

  private emptyValue(what: 'site' | 'time' | 'state', at: number, line: number): void {
    this.fail(VALUE, new SereError('EMPTY_VALUE', `empty ${what} in column ${at + 1} (${quote(this.header![at]!)})`,
      { file: this.file, line, column: at + 1 }, `fill in the ${what} or remove the row`));
  }

  /**
   * The state id of a label id, worked out once per distinct label: through the label map when
   * there is one (a label mapped to skip gives SKIP, one it lacks UNMAPPED, listed at the end),
   * then checked as a state. FAILED when the state is refused (the problem is kept).
   */
  private stateIdOf(label: number, line: number, at: number): number {
    let id = label < this.stateIds.length ? this.stateIds[label]! : NEW;
    if (id === SKIP) this.dropped += 1;
    if (id !== NEW) return id;
    const text = this.stateLabels.labels[label]!;
    let state = text;
    const map = this.options.labels;
    if (map) {
      const target = map.targets.get(text);
      if (target === null) id = SKIP;
      else if (target !== undefined) {
        state = target;
        if (this.declared.size > 0 && !this.declared.has(target)) {
          // The row holds the recorded label; the state to fix is in the map (or in the declared list).
          this.fail(STATE, new SereError('UNKNOWN_STATE',
            `label ${quote(text)} is mapped to ${quote(target)}, which is not a declared state (declared: ${[...this.declared].map(quote).join(', ')})`,
            { file: map.file, line: map.lines.get(text) }, `map ${quote(text)} to a declared state, or add ${quote(target)} to the declared states`));
          return FAILED;
        }
      }
      else if (!map.states.has(text) && !this.declared.has(text)) {
        id = UNMAPPED;
        this.unmapped.push({ label: text, line, column: at + 1 });
      }
    }
    if (id === NEW) {
      try {
        id = this.states.see(state, line, at + 1);
      } catch (err) {
        if (!(err instanceof SereError)) throw err;
        this.fail(STATE, err);
        return FAILED;
      }
    }
    if (id === SKIP) this.dropped += 1;
    if (label >= this.stateIds.length) {
      const grown = new Int16Array(Math.max(this.stateIds.length * 2, label + 1)).fill(NEW);
      grown.set(this.stateIds);
      this.stateIds = grown;
    }
    this.stateIds[label] = id;
    return id;
  }

  /** The validated table, or the first-ranked problem. */
  table(sha256: string): SurveyTable {
    const file = this.file;
    if (this.header === undefined) {
      throw this.error ?? new SereError('EMPTY_FILE', 'the survey table is empty', { file },
        'add a header row (site,time,state) and one row per site and survey');
    }
    if (this.error && this.stage <= HEADER) throw this.error;
    if (this.bodyRows === 0 || (this.layout?.layout === 'wide' && this.filledCells === 0 && !this.error)) {
      throw new SereError('EMPTY_FILE', 'the survey table has a header but no survey rows', { file, line: this.headerLine },
        'add one row per site and survey below the header');
    }
    if (this.error && this.stage <= STATE) throw this.inTimeColumn(this.error);
    if (this.unmapped.length > 0) throw this.unmappedError();
    let resolved;
    try {
      resolved = this.states.finish();
    } catch (err) {
      throw err instanceof SereError ? this.inTimeColumn(err) : err;
    }
    if (this.error) throw this.error;
    const { states, index: stateIndex } = resolved;

    const store = this.store;
    const { sites, rank } = this.surveyedSites();
    // Positions by the sites' final order, taken from the rows (a site without surveys is no site).
    const positions = this.positions ? new Float64Array(2 * sites.length) : undefined;
    for (let n = 0; n < store.count; n++) {
      if (positions) {
        const id = store.site[n]!;
        positions[2 * rank[id]!] = this.positions![2 * id]!;
        positions[2 * rank[id]! + 1] = this.positions![2 * id + 1]!;
      }
      store.site[n] = rank[store.site[n]!]!;
      store.state[n] = stateIndex[store.state[n]!]!;
    }
    const seasons = this.options.dates ? roundToSeasons(store.time, store.line, store.count) : undefined;
    const ordered = orderRows(store, sites.length);
    if (ordered.conflict) {
      // A site surveyed twice at one time must agree with itself; an exact repeat is used once.
      const { first, later } = ordered.conflict;
      throw new SereError('DUPLICATE_SURVEY',
        `site ${quote(sites[later.site]!)} at time ${later.time} is ${quote(states[later.state]!)} here but ${quote(states[first.state]!)} on ${this.lineWord} ${first.line}`,
        { file, line: later.line }, 'keep one of the two rows');
    }
    return {
      file, states, sites, rows: ordered.rows, repeatedRows: ordered.repeated, sha256,
      ...(positions ? { positions } : {}),
      ...(this.layout?.index.group !== undefined ? { groups: this.groups.labels } : {}),
      ...(this.layout?.layout === 'long' && this.layout.index.observer !== undefined
        ? { observers: this.observers.labels, observerColumn: { name: this.header![this.layout.index.observer]!, column: this.layout.index.observer + 1 } } : {}),
      ...(this.options.labels ? { labels: { file: this.options.labels.file, sha256: this.options.labels.sha256, droppedRows: this.dropped } } : {}),
      ...(seasons ? { seasons } : {}),
    };
  }

  /**
   * Sites in code-point order and each site label's rank among them — only sites with a survey
   * kept: a wide table's row of empty cells, or a site whose every label the map skips, is no site.
   */
  private surveyedSites(): { sites: string[]; rank: Int32Array } {
    const { sorted, rank } = this.sites.ranks();
    const surveyed = new Uint8Array(sorted.length);
    for (let n = 0; n < this.store.count; n++) surveyed[rank[this.store.site[n]!]!] = 1;
    if (surveyed.every((s) => s === 1)) return { sites: sorted, rank };
    const kept = new Int32Array(sorted.length);
    const sites: string[] = [];
    sorted.forEach((site, r) => {
      kept[r] = sites.length;
      if (surveyed[r]) sites.push(site);
    });
    return { sites, rank: rank.map((r) => kept[r]!) };
  }

  /** Every label the map lacks, with where it first appears: one error, so one edit fixes them all. */
  private unmappedError(): SereError {
    const first = this.unmapped[0]!;
    const layout = this.layout;
    const where = (u: { line: number; column: number }): string =>
      layout?.layout === 'wide' ? `${this.lineWord} ${u.line}, ${layout.index.times[u.column - 1]}` : `${this.lineWord} ${u.line}`;
    const shown = this.unmapped.slice(0, MAX_LISTED).map((u) => `${quote(u.label)} (${where(u)})`).join(', ');
    const more = this.unmapped.length > MAX_LISTED ? ` and ${this.unmapped.length - MAX_LISTED} more` : '';
    const one = this.unmapped.length === 1;
    return new SereError('UNMAPPED_LABEL', `${one ? 'a label is' : `${this.unmapped.length} labels are`} not in the label map: ${shown}${more}`,
      { file: this.file, line: first.line, column: first.column },
      `add ${one ? 'it' : 'each'} to ${this.options.labels!.file}, mapped to a state or to skip`);
  }

  /** In a wide table, a cell's message also names its column's survey time. */
  private inTimeColumn(err: SereError): SereError {
    const layout = this.layout;
    const column = err.place.column;
    if (layout?.layout !== 'wide' || column === undefined || err.place.line === this.headerLine) return err;
    const time = layout.index.times[column - 1];
    if (time === undefined || Number.isNaN(time)) return err;
    return new SereError(err.code, `${err.message} (in the ${time} column)`, err.place, err.hint);
  }

  private checkLabel(role: 'site' | 'group' | 'observer', label: string, line: number, at: number): void {
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
