import { readFileSync } from 'node:fs';
import { basename, resolve } from 'node:path';
import { Document } from 'yaml';
import { readSurveyTables } from '../data/read-survey-tables.js';
import { DEFAULT_COLUMNS } from '../data/survey.js';
import { SereError } from '../errors.js';
import { fitSurvey } from '../fit/fit.js';
import { surveyReadOptions, type FitSettings } from '../fit/settings.js';
import { WORKSPACE_FILE } from './workspace.js';
import { installed, refuseUsedFolder, writeWorkspace } from './init.js';

/** How far the do-nothing scenario of a new workspace looks ahead, in years (rounded up to whole steps). */
export const INIT_HORIZON_YEARS = 20;

/**
 * A new workspace from one's own survey table: the table copied in, its fit settings written to
 * the workspace file (the states stated in order, so a new label next season is an error rather
 * than a silent reordering), and one do-nothing scenario from the latest surveyed mix. The table
 * is read and fitted first, so bad input stops here with nothing written.
 */
export function initWorkspaceFrom(dir: string, survey: string, settings: FitSettings, seed: number): string[] {
  refuseUsedFolder(dir);
  const table = readSurveyTables([survey], surveyReadOptions(settings));
  const fit = fitSurvey(table, settings);
  const name = basename(resolve(dir));
  const tableName = `surveys/${basename(survey)}`;
  // The label map is copied in beside the table: every season (and every record) reads its own copy.
  const labelsName = settings.labels === undefined ? undefined : `surveys/${basename(settings.labels)}`;
  if (labelsName === tableName) {
    throw new SereError('BAD_OPTION', 'the label map and the survey table have the same file name', { path: '--labels' }, 'rename one of the two files');
  }
  // The error table too: a later season's changed copy is a change the season reports (changes.ts).
  const errorsName = settings.errors === undefined ? undefined : `surveys/${basename(settings.errors)}`;
  if (errorsName !== undefined && (errorsName === tableName || errorsName === labelsName)) {
    throw new SereError('BAD_OPTION', `the error table has the same file name as the ${errorsName === tableName ? 'survey table' : 'label map'}`, { path: '--errors' }, 'rename one of the files');
  }
  const columns = Object.fromEntries(Object.entries(settings.columns)
    .filter(([key, value]) => value !== undefined && value !== (DEFAULT_COLUMNS as unknown as Record<string, string>)[key]));
  const fitBlock: Record<string, unknown> = {
    step: settings.dates ? `${settings.step}y` : settings.step,
    prior: settings.prior,
    states: [...fit.states],
    ...(settings.impossible.length > 0 ? { impossible: settings.impossible.map(([from, to]) => `${from}>${to}`) } : {}),
    ...(Object.keys(columns).length > 0 ? { columns } : {}),
    ...(settings.layout ? { layout: settings.layout } : {}),
    ...(settings.sheet !== undefined ? { sheet: settings.sheet } : {}),
    ...(labelsName !== undefined ? { labels: labelsName } : {}),
    ...(errorsName !== undefined ? { errors: errorsName } : {}),
  };
  const workspace = new Document({
    name, surveys: [tableName], fit: fitBlock, scenarios: ['scenarios/do-nothing.yaml'], records: 'records', seed,
  });
  workspace.commentBefore = ` A sere workspace started from ${basename(survey)}. Run \`sere season\` here after each season's surveys.`;
  const years = Math.ceil(INIT_HORIZON_YEARS / settings.step) * settings.step;
  const scenario = new Document({
    name: `${name} — do nothing`,
    description: `The latest surveyed mix (${fit.latest.time}) projected ${years} years on with no management.`,
    start: 'latest',
    horizon: { years },
    uncertainty: { source: 'posterior', draws: 4000 },
  });
  scenario.commentBefore = ' yaml-language-server: $schema=../scenario.schema.json';

  const files = new Map<string, string | Buffer>();
  files.set(WORKSPACE_FILE, workspace.toString());
  // The exact bytes: the record's SHA-256 is of the file as surveyed.
  files.set(tableName, readFileSync(survey));
  if (labelsName !== undefined) files.set(labelsName, readFileSync(settings.labels!));
  if (errorsName !== undefined) files.set(errorsName, readFileSync(settings.errors!));
  files.set('scenarios/do-nothing.yaml', scenario.toString());
  files.set('scenario.schema.json', readFileSync(installed('schema/scenario.schema.json'), 'utf8'));
  writeWorkspace(dir, files);
  return [...files.keys()];
}
