import { csvRecords } from './read-csv-records.js';
import { SereError, quote } from '../errors.js';
import { COUNTS_COLUMNS, FIRST_SURVEY, LAST_SURVEY, sortCells, sortSiteCells, REQUIRED_COUNTS_COLUMNS, type CountCell, type CountsTable, type SiteCell } from './counts-table.js';
import { labelProblem, normaliseLabel } from './labels.js';
import { readTextFile } from './read-text-file.js';
import { StateLabels } from './states.js';
import type { Place } from '../errors.js';

export interface ReadCountsOptions {
  /** Declared states, in the user's order; when absent, the labels found, sorted (as for a survey table). */
  readonly states?: readonly string[];
  readonly statesPlace?: Place;
}

const WHAT = 'counts table';
const HINT = 'write counts tables with sere count (or sere count --sql), and do not edit them by hand';

/**
 * Read a counts table (data/counts-table.ts; README, "Counts table") and check every row before
 * anything is fitted: labels as a survey table's are checked (labels.ts, states.ts), counts whole
 * and positive, one step throughout, a gap for every pair and none for a first survey. A pair 0
 * steps apart is two surveys of one site at one time: in one state, an exact repeat, dropped and
 * counted as a survey table's are; in two states, the contradiction a survey table refuses, and
 * refused here too. Last-survey rows (a from_state, no to_state) are pooled, and when a table has
 * them they count every site once: per group, as many sites as the first-survey rows.
 */
export function readCountsCsv(file: string, options: ReadCountsOptions = {}): CountsTable {
  const { text, sha256 } = readTextFile(file, WHAT);
  const records = csvRecords(file, text, HINT);
  if (records.length === 0) throw new SereError('EMPTY_FILE', 'the counts table is empty', { file }, HINT);
  const header = records[0]!.record.map(normaliseLabel);
  const missing = REQUIRED_COUNTS_COLUMNS.filter((c) => !header.includes(c));
  if (missing.length > 0) {
    throw new SereError('MISSING_COLUMN', `no ${missing.map(quote).join(', ')} column${missing.length > 1 ? 's' : ''} (a counts table has ${COUNTS_COLUMNS.join(', ')})`,
      { file, line: records[0]!.info.lines }, HINT);
  }
  const at = (name: string): number => header.indexOf(name);
  const col = { group: at('site_group'), site: at('site'), from: at('from_state'), to: at('to_state'), gap: at('gap'), time: at('to_time'), step: at('step'), n: at('n') };
  const labels = new StateLabels(file, options.states, 2, options.statesPlace);
  const cells: (CountCell & { rawFrom: number; rawTo: number })[] = [];
  const siteCells: (SiteCell & { rawFrom: number; rawTo: number })[] = [];
  let step: number | undefined;
  let repeatedRows = 0;
  // Per group: sites by first-survey rows and by last-survey rows, and the first last-survey row's line.
  const firstSites = new Map<string, number>();
  const lastSites = new Map<string, number>();
  let lastLine = 0;
  for (const { record, info } of records.slice(1)) {
    const line = info.lines;
    const place = (name: keyof typeof col): Place => ({ file, line, column: col[name] + 1 });
    const field = (name: keyof typeof col): string => (col[name] < 0 ? '' : normaliseLabel(record[col[name]]!));
    const whole = (name: 'time' | 'step' | 'n', min: number): number => {
      const value = field(name);
      const x = value === '' ? NaN : Number(value);
      if (!Number.isSafeInteger(x) || x < min) {
        throw new SereError('BAD_COUNTS', `${name === 'time' ? 'to_time' : name} ${quote(value)} is not a whole number${min > Number.MIN_SAFE_INTEGER ? ` of at least ${min}` : ''}`, place(name), HINT);
      }
      return x;
    };
    const label = (name: 'group' | 'site'): string | undefined => {
      if (col[name] < 0) return undefined;
      const value = field(name);
      const problem = labelProblem(value, () => `${name} ${quote(value)}`);
      if (problem) throw new SereError(problem.code, problem.what, place(name), problem.hint);
      return value;
    };
    const rowStep = whole('step', 1);
    if (step !== undefined && rowStep !== step) {
      throw new SereError('BAD_COUNTS', `step ${rowStep} here, but ${step} on the rows above: one counts table holds one step`, place('step'),
        'count every shard with the same --step');
    }
    step = rowStep;
    const n = whole('n', 1);
    const fromLabel = field('from');
    const toLabel = field('to');
    if (toLabel === '' && fromLabel === '') throw new SereError('EMPTY_VALUE', 'from_state and to_state are both empty', place('to'), HINT);
    const to = toLabel === '' ? LAST_SURVEY : labels.see(toLabel, line, col.to + 1);
    const from = fromLabel === '' ? FIRST_SURVEY : labels.see(fromLabel, line, col.from + 1);
    const group = label('group');
    const site = label('site');
    const gapText = field('gap');
    if (to === LAST_SURVEY) {
      // A last-survey row: pooled, no gap (counts-table.ts).
      if (site !== undefined && site !== '') throw new SereError('BAD_COUNTS', `a last-survey row (no to_state) for site ${quote(site)}: these rows are pooled`, place('site'), HINT);
      if (gapText !== '') throw new SereError('BAD_COUNTS', `a last-survey row (no to_state) has gap ${quote(gapText)}`, place('gap'), 'leave gap empty on last-survey rows');
      if (group === '') throw new SereError('EMPTY_VALUE', 'site_group is empty', place('group'), 'give every row its group');
      lastSites.set(group ?? '', (lastSites.get(group ?? '') ?? 0) + n);
      if (lastLine === 0) lastLine = line;
      cells.push({ ...(group === undefined ? {} : { group }), from, to, gap: 0, time: whole('time', Number.MIN_SAFE_INTEGER), n, line, rawFrom: from, rawTo: to });
      continue;
    }
    let gap = 0;
    if (from === FIRST_SURVEY) {
      if (gapText !== '') throw new SereError('BAD_COUNTS', `a first survey (no from_state) has gap ${quote(gapText)}`, place('gap'), 'leave gap empty on first-survey rows');
    } else {
      gap = gapText === '' ? NaN : Number(gapText);
      if (gap === 0 && fromLabel === toLabel) {
        // Two identical surveys of a site at one time (the counting SQL keeps them): used once, as a survey table's.
        if (site === undefined || site === '') repeatedRows += n;
        continue;
      }
      if (gap === 0) {
        throw new SereError('DUPLICATE_SURVEY', `${n} site${n === 1 ? ' was' : 's were'} surveyed twice at time ${field('time')} with different states (${quote(fromLabel)} and ${quote(toLabel)})`,
          place('gap'), 'find the contradicting rows in the survey table and keep one of each pair');
      }
      if (!Number.isFinite(gap) || gap < 0) throw new SereError('BAD_COUNTS', `gap ${quote(gapText)} is not a positive number of steps`, place('gap'), HINT);
    }
    const groupPart = group === undefined ? {} : { group };
    if (site !== undefined && site !== '') {
      if (from === FIRST_SURVEY && n !== 1) throw new SereError('BAD_COUNTS', `site ${quote(site)} has ${n} first surveys`, place('n'), HINT);
      siteCells.push({ site, ...groupPart, from, to, gap, n, line, rawFrom: from, rawTo: to });
      continue;
    }
    if (group === '') throw new SereError('EMPTY_VALUE', 'site_group is empty', place('group'), 'give every row its group');
    if (from === FIRST_SURVEY) firstSites.set(group ?? '', (firstSites.get(group ?? '') ?? 0) + n);
    cells.push({ ...groupPart, from, to, gap, time: whole('time', Number.MIN_SAFE_INTEGER), n, line, rawFrom: from, rawTo: to });
  }
  if (step === undefined) throw new SereError('EMPTY_FILE', 'the counts table has a header but no rows', { file }, HINT);
  if (lastSites.size > 0) {
    for (const group of new Set([...firstSites.keys(), ...lastSites.keys()])) {
      const first = firstSites.get(group) ?? 0;
      const last = lastSites.get(group) ?? 0;
      if (first !== last) {
        throw new SereError('BAD_COUNTS', `the last-survey rows count ${last} site${last === 1 ? '' : 's'}${group ? ` in group ${quote(group)}` : ''}, the first-survey rows ${first}`,
          { file, line: lastLine }, HINT);
      }
    }
  }
  const { states, index } = labels.finish();
  const map = (id: number): number => (id < 0 ? id : index[id]!); // FIRST_SURVEY, LAST_SURVEY
  const strip = <C extends { rawFrom: number; rawTo: number }>({ rawFrom, rawTo, ...rest }: C): Omit<C, 'rawFrom' | 'rawTo'> => ({ ...rest, from: map(rawFrom), to: map(rawTo) });
  const perSite = col.site >= 0 && siteCells.length > 0;
  return {
    file, sha256, states, step, grouped: col.group >= 0,
    cells: sortCells(cells.map(strip)),
    ...(perSite ? { siteCells: sortSiteCells(siteCells.map(strip)) } : {}),
    repeatedRows,
  };
}
