import { extname } from 'node:path';
import { readSurveyCsv } from '../data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../data/survey.js';
import { SereError, quote } from '../errors.js';
import type { SurveyTable } from '../data/survey.js';
import { groupsWithRows, selectRows } from '../data/survey-rows.js';
import { fitSurvey, type Fit } from './fit.js';
import { loadFit } from './load-fit.js';
import type { FitSettings } from './settings.js';

export const DEFAULT_FIT_SETTINGS: FitSettings = { step: 1, prior: 'jeffreys', impossible: [], columns: DEFAULT_COLUMNS };

/** A fit from either a fit file (.json, written by `sere fit --out`) or a survey table, fitted now. */
export function fitFromFile(file: string, settings: FitSettings = DEFAULT_FIT_SETTINGS): Fit {
  if (extname(file).toLowerCase() === '.json') return loadFit(file);
  const table = readSurveyCsv(file, { columns: settings.columns, states: settings.states, statesPlace: settings.places?.states, dates: settings.dates });
  return fitSurvey(settings.group === undefined ? table : groupOf(table, settings.group, settings.columns.group), settings);
}

/** The rows of one group, keeping the whole table's states so every group's fit lines up. */
export function groupOf(table: SurveyTable, group: string, column: string | undefined): SurveyTable {
  if (column === undefined) {
    throw new SereError('BAD_OPTION', `fitting group ${quote(group)} needs a group column`, { file: table.file },
      'name the column that holds the groups (columns.group in a scenario, --group-column or --by on the command line)');
  }
  const g = table.groups?.indexOf(group) ?? -1;
  const selected = g < 0 ? undefined : selectRows(table, (n) => table.rows.group![n] === g);
  if (selected === undefined || selected.rows.count === 0) {
    throw new SereError('BAD_OPTION', `no rows with ${column} = ${quote(group)}`, { file: table.file }, `use one of: ${groupsOf(table).join(', ')}`);
  }
  return selected;
}

/** The distinct groups of a table, sorted. */
export function groupsOf(table: SurveyTable): string[] {
  return groupsWithRows(table);
}
