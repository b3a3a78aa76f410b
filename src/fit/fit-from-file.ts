import { extname } from 'node:path';
import { readSurveyCsv } from '../data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../data/survey.js';
import { fitSurvey, type Fit } from './fit.js';
import { loadFit } from './load-fit.js';
import type { FitSettings } from './settings.js';

export const DEFAULT_FIT_SETTINGS: FitSettings = { step: 1, prior: 'jeffreys', impossible: [], columns: DEFAULT_COLUMNS };

/** A fit from either a fit file (.json, written by `sere fit --out`) or a survey table, fitted now. */
export function fitFromFile(file: string, settings: FitSettings = DEFAULT_FIT_SETTINGS): Fit {
  if (extname(file).toLowerCase() === '.json') return loadFit(file);
  const table = readSurveyCsv(file, { columns: settings.columns, states: settings.states });
  return fitSurvey(table, settings);
}
