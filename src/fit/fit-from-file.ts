import { extname } from 'node:path';
import { readSurveyCsv } from '../data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../data/survey.js';
import { SereError, quote } from '../errors.js';
import type { SurveyTable } from '../data/survey.js';
import { groupsWithRows, selectRows } from '../data/survey-rows.js';
import { fitSurvey, type Fit } from './fit.js';
import { loadFit } from './load-fit.js';
import { surveyReadOptions, type FitSettings } from './settings.js';
import { isRasterStackFile } from '../data/raster/stack-file.js';
import type { RasterCounts } from '../data/raster/count-stack.js';
import { fitRasterCounts, fitRasterZoned } from './fit-from-raster.js';
import { fitCounts } from './fit-counts.js';
import { isCountsFile } from '../data/counts-table.js';
import { readCountsCsv } from '../data/read-counts-csv.js';
import { fitZoned } from './zones.js';

export const DEFAULT_FIT_SETTINGS: FitSettings = { step: 1, stepDefaulted: true, prior: 'jeffreys', impossible: [], columns: DEFAULT_COLUMNS };

/**
 * A fit from a fit file (.json, written by `sere fit --out`), a counts table (`sere count`, told by
 * its header), a survey table, fitted now, or a
 * raster stack (.yaml) — counted beforehand (reading rasters is asynchronous) and passed in `rasters`.
 */
export function fitFromFile(file: string, settings: FitSettings = DEFAULT_FIT_SETTINGS, rasters?: ReadonlyMap<string, RasterCounts>): Fit {
  if (extname(file).toLowerCase() === '.json') return loadFit(file);
  const zoned = zonedPooling(file, settings);
  const poolingPlace = settings.places?.pooling ?? { path: '--pooling' };
  const raster = isRasterStackFile(file);
  if (zoned && !raster) return fitZoned(readSurveyCsv(file, surveyReadOptions(settings)), settings, zoned, poolingPlace);
  if (raster) {
    if (settings.labels !== undefined || settings.sheet !== undefined || settings.layout !== undefined) {
      throw new SereError('BAD_OPTION', 'a raster stack names its class-code labels in the stack file, and has no sheets or layout',
        settings.places?.labels ?? settings.places?.sheet ?? { file }, 'map class codes to states under labels: in the stack file');
    }
    const counted = rasters?.get(file);
    if (!counted) {
      throw new SereError('BAD_OPTION', 'this command reads survey tables and fit files, not raster stacks', { file },
        'fit the stack first (sere fit STACK.yaml --out fit.json) and name fit.json as data, or run sere forecast');
    }
    return zoned ? fitRasterZoned(counted, settings, zoned, poolingPlace) : fitRasterCounts(counted, settings);
  }
  if (isCountsFile(file)) return fitCounts(readCountsCsv(file, { states: settings.states, statesPlace: settings.places?.states }), settings);
  const table = readSurveyCsv(file, surveyReadOptions(settings));
  return fitSurvey(settings.group === undefined ? table : groupOf(table, settings.group, settings.columns.group), settings);
}

/**
 * `pooling: partial | none` (zones.ts), or undefined for one pooled fit. Zones are the values of a
 * survey table's group column or a raster stack's zone raster (checked once it is counted:
 * fit-from-raster.ts `fitRasterZoned`): a counts table, or one group picked by `group`, is refused
 * in one line.
 */
export function zonedPooling(file: string, settings: FitSettings): 'partial' | 'none' | undefined {
  const pooling = settings.pooling;
  if (pooling === undefined || pooling === 'complete') return undefined;
  const place = settings.places?.pooling ?? { path: '--pooling' };
  if (isCountsFile(file)) {
    throw new SereError('BAD_ZONES', `pooling: ${pooling} reads each site's zone from a survey table's zone column or a stack's zone raster`, { file, path: place.path },
      'fit the survey table itself with its zone column (columns.group / --group-column)');
  }
  if (settings.group !== undefined) {
    throw new SereError('BAD_ZONES', `pooling: ${pooling} fits every zone, and group picks one`, place,
      'drop group (one zone\'s own fit) or drop pooling');
  }
  if (settings.errors !== undefined) {
    // Not built yet: the observer-error sampler fits one pooled chain (uncertainty/augment-errors.ts).
    throw new SereError('BAD_ZONES', `pooling: ${pooling} and an error matrix cannot be combined yet`, place,
      'fit the zones with pooling: complete (one chain) when giving errors, or drop errors to pool the zones partially');
  }
  return pooling;
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
