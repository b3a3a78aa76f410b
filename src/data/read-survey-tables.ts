import { createHash } from 'node:crypto';
import { SereError, quote } from '../errors.js';
import { sortByCodePoints } from './code-points.js';
import { firstDifference, lookAlikeKey, MAX_STATES } from './labels.js';
import { orderRows, type GivenRow } from './order-rows.js';
import { readSurveyCsv, type ReadSurveyOptions } from './read-survey-csv.js';
import { RowStore } from './row-store.js';
import type { SurveyTable } from './survey.js';

/**
 * Several survey tables read as one — typically one file per season, the same sites surveyed
 * again. States are the declared ones, or the union of every file's states, sorted; a site
 * surveyed at the same time in two files must agree (the error names both files). The SHA-256 is
 * of the files' own hashes in order, so any change in any file shows.
 */
export function readSurveyTables(files: readonly string[], options: ReadSurveyOptions): SurveyTable {
  if (files.length === 1) return readSurveyCsv(files[0]!, options);
  // Each file alone may hold a single state (a season when every plot stayed put); the union must not.
  const tables = files.map((file) => readSurveyCsv(file, { ...options, partOfSeveral: true }));
  // Declared states come back from each table checked and normalised (NFC): use those, not the raw option.
  const states = options.states ? [...tables[0]!.states] : [...new Set(tables.flatMap((t) => t.states))].sort();
  if (states.length < 2) {
    throw new SereError('TOO_FEW_STATES', `every site in every survey table is in the same state (${quote(states[0]!)})`,
      { file: files.join(', ') }, 'a chain needs surveys that record at least two different states');
  }
  if (states.length > MAX_STATES) {
    throw new SereError('TOO_MANY_STATES', `the survey tables hold ${states.length} different states together (at most ${MAX_STATES})`,
      { file: files.join(', ') }, `merge states into at most ${MAX_STATES} classes`);
  }
  if (!options.states) {
    const byKey = new Map<string, string>();
    for (const s of states) {
      const clash = byKey.get(lookAlikeKey(s));
      if (clash !== undefined) {
        const how = s.toLowerCase() === clash.toLowerCase() ? 'only by case' : `only by look-alike characters (${firstDifference(s, clash)})`;
        throw new SereError(s.toLowerCase() === clash.toLowerCase() ? 'STATE_CASE_CLASH' : 'STATE_LOOK_ALIKE',
          `state ${quote(s)} in one survey file differs from ${quote(clash)} in another ${how}`,
          { file: files.join(', ') }, 'use one spelling in every file, or declare the states');
      }
      byKey.set(lookAlikeKey(s), s);
    }
  }
  const { table, conflict } = concatenate(tables, states);
  if (conflict) {
    const { later, first } = conflict;
    throw new SereError('DUPLICATE_SURVEY',
      `site ${quote(table.sites[later.row.site]!)} at time ${later.row.time} is ${quote(states[later.row.state]!)} here but ${quote(states[first.row.state]!)} in ${first.file} line ${first.row.line}`,
      { file: later.file, line: later.row.line }, 'keep one of the two rows');
  }
  const sha256 = createHash('sha256').update(tables.map((t) => t.sha256).join('\n')).digest('hex');
  const labels = tables[0]!.labels;
  return { ...table, file: files.join(', '), sha256,
    ...(labels ? { labels: { ...labels, droppedRows: tables.reduce((n, t) => n + (t.labels?.droppedRows ?? 0), 0) } } : {}) };
}

interface RowAt { readonly file: string; readonly row: GivenRow }

/**
 * The tables' rows as one table: sites, states, groups and observers renumbered into their unions, every
 * (site, time) kept once — the first file's row — and the first contradiction found, by file and
 * then line.
 */
function concatenate(tables: readonly SurveyTable[], states: readonly string[]): { table: SurveyTable; conflict?: { first: RowAt; later: RowAt } } {
  const sites = sortByCodePoints([...new Set(tables.flatMap((t) => t.sites))]);
  const siteIndex = new Map(sites.map((s, i) => [s, i] as const));
  const stateIndex = new Map(states.map((s, i) => [s, i] as const));
  const grouped = tables.every((t) => t.groups !== undefined);
  const groups = grouped ? [...new Set(tables.flatMap((t) => t.groups!))] : undefined;
  const groupIndex = new Map(groups?.map((g, i) => [g, i] as const));
  // Observers likewise (observer error), kept when every table has an observer column.
  const observed = tables.every((t) => t.observers !== undefined);
  const observers = observed ? [...new Set(tables.flatMap((t) => t.observers!))] : undefined;
  const observerIndex = new Map(observers?.map((o, i) => [o, i] as const));
  const store = new RowStore(grouped, observed);
  store.reserve(tables.reduce((n, t) => n + t.rows.count, 0));
  const fileOf: number[] = [];
  tables.forEach((t) => {
    const site = Int32Array.from(t.sites, (s) => siteIndex.get(s)!);
    const state = Uint8Array.from(t.states, (s) => stateIndex.get(s)!);
    const group = Int32Array.from(t.groups ?? [], (g) => groupIndex.get(g)!);
    const observer = Int32Array.from(t.observers ?? [], (o) => observerIndex.get(o)!);
    const r = t.rows;
    for (let n = 0; n < r.count; n++) {
      store.push(site[r.site[n]!]!, r.time[n]!, state[r.state[n]!]!, r.line[n]!, r.group ? group[r.group[n]!]! : 0, r.observer && observed ? observer[r.observer[n]!]! : 0);
    }
    fileOf.push(store.count);
  });
  const file = (row: number): number => fileOf.findIndex((end) => row < end);
  const earlier = (a: number, b: number): boolean => {
    const fa = file(a);
    const fb = file(b);
    return fa !== fb ? fa < fb : store.line[a]! < store.line[b]!;
  };
  const ordered = orderRows(store, sites.length, earlier);
  const repeatedRows = ordered.repeated + tables.reduce((n, t) => n + t.repeatedRows, 0);
  const table: SurveyTable = {
    file: '', states, sites, rows: ordered.rows, repeatedRows, sha256: '', ...(groups ? { groups } : {}),
    ...(observers ? { observers, observerColumn: { name: tables[0]!.observerColumn!.name } } : {}),
  };
  if (!ordered.conflict) return { table };
  const at = (row: GivenRow): RowAt => ({ file: tables[file(row.index)]!.file, row });
  return { table, conflict: { first: at(ordered.conflict.first), later: at(ordered.conflict.later) } };
}
