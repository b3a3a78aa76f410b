import { readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { readSurveyTables } from '../data/read-survey-tables.js';
import { fitSurvey, type Fit } from '../fit/fit.js';
import { groupOf } from '../fit/fit-from-file.js';
import { estimateFit } from '../fit/estimate.js';
import { fitToJson } from '../fit/fit-json.js';
import { loadScenarios } from '../scenario/load-scenario.js';
import { checkComparable } from '../scenario/comparable.js';
import type { Scenario } from '../scenario/scenario.js';
import { checkScenarios } from '../engine/check-treatments.js';
import { runForecast, type ForecastResult } from '../engine/forecast.js';
import { runComparison, type Comparison } from '../engine/compare.js';
import { forecastJson } from '../report/forecast-json.js';
import { comparisonJson } from '../report/compare-json.js';
import { tidyCsv } from '../report/tidy-csv.js';
import { SereError } from '../errors.js';
import { stemOf } from './record-names.js';
import { randomStreams } from '../uncertainty/random.js';
import { TOOL_VERSION } from '../version.js';
import { WORKSPACE_FILE, type Workspace } from './workspace.js';
import { changesSince, type Changes, type StoredFit, type StoredForecast } from './changes.js';
import { scoreRecord, type RecordScore, type ScorableForecast } from './score-records.js';
import { observedMixes } from '../evaluation/observed.js';

export interface SeasonOptions {
  /** The record's date, YYYY-MM-DD. */
  readonly date: string;
  /** Seeds by scenario file (a replay uses the record's); otherwise the scenario's, the workspace's, or `fallbackSeed`. */
  readonly seeds?: Readonly<Record<string, number>>;
  /** The seed for files that name none, chosen (and so printable) where the run starts. */
  readonly fallbackSeed?: number;
  /** The previous record, read back, to say what changed. */
  readonly previous?: { readonly name: string; readonly fit: StoredFit; readonly forecasts: readonly StoredForecast[] };
  /** Earlier records whose forecasts are scored against the surveys made since. */
  readonly earlier?: readonly { readonly name: string; readonly forecasts: readonly ScorableForecast[] }[];
}

export interface SeasonRun {
  readonly fit: Fit;
  readonly forecasts: readonly { readonly file: string; readonly results: readonly ForecastResult[] }[];
  readonly comparisons: readonly { readonly file: string; readonly comparison: Comparison }[];
  readonly changes: Changes | null;
  readonly scores: readonly RecordScore[];
  readonly seeds: Readonly<Record<string, number>>;
  /** Every file of the record, by path inside it. */
  readonly files: ReadonlyMap<string, string>;
}


/**
 * One season: refit from the workspace's current surveys, rerun every scenario (and compare the
 * alternatives of files that list several), and assemble the record — the fit, the exact inputs,
 * JSON summaries, tidy CSV tables, what changed, and a manifest of hashes, seeds and version.
 * Paths inside outputs are relative to the workspace, so a record reruns identically elsewhere.
 */
export async function runSeason(ws: Workspace, options: SeasonOptions): Promise<SeasonRun> {
  const settings = ws.fitSettings;
  const surveyPaths = ws.surveys.map((s) => relative(process.cwd(), join(ws.root, s)) || s);
  let table = readSurveyTables(surveyPaths, { columns: settings.columns, states: settings.states, statesPlace: settings.places?.states });
  if (settings.group !== undefined) table = groupOf(table, settings.group, settings.columns.group);
  const fitted = fitSurvey(table, settings);
  const fit: Fit = { ...fitted, input: { file: ws.surveys.join(', '), sha256: fitted.input.sha256 } };
  const estimates = estimateFit(fit, 0.9);

  const seeds: Record<string, number> = {};
  const byFile = ws.scenarios.map((rel) => {
    const scenarios = loadScenarios(join(ws.root, rel), { fit }).map((s): Scenario => ({ ...s, file: rel }));
    const seed = options.seeds?.[rel] ?? scenarios[0]!.seed ?? ws.seed ?? options.fallbackSeed;
    if (seed === undefined) {
      throw new SereError('BAD_RECORD', `no seed is recorded for scenario ${rel}`, { file: 'manifest.json', path: 'scenarios' }, 'rerun the season instead of replaying it');
    }
    seeds[rel] = seed;
    return { file: rel, scenarios };
  });
  for (const { scenarios } of byFile) {
    checkScenarios(scenarios);
    if (scenarios.length > 1) checkComparable(scenarios);
  }
  const forecasts = byFile.map(({ file, scenarios }) => ({
    file, results: scenarios.map((s) => runForecast(s, randomStreams(seeds[file]!))),
  }));
  const comparisons = byFile.filter((b) => b.scenarios.length > 1)
    .map(({ file, scenarios }) => ({ file, comparison: runComparison(scenarios, randomStreams(seeds[file]!)) }));
  const changes = options.previous
    ? changesSince(options.previous.name, options.previous, fit, estimates.mle, forecasts.flatMap((f) => f.results))
    : null;

  const observed = observedMixes(table.rows, fit.states.length);
  const scores = (options.earlier ?? []).flatMap((r) => scoreRecord(r.name, r.forecasts, observed, fit.states));

  const files = new Map<string, string>();
  const json = (x: unknown): string => JSON.stringify(x, null, 2) + '\n';
  for (const rel of [WORKSPACE_FILE, ...ws.surveys, ...ws.scenarios]) files.set(`inputs/${rel}`, readFileSync(join(ws.root, rel), 'utf8'));
  files.set('fit.json', json(fitToJson(fit, estimates)));
  for (const { file, results } of forecasts) {
    files.set(`forecasts/${stemOf(file)}.json`, json(forecastJson(results)));
    files.set(`tables/${stemOf(file)}.csv`, tidyCsv(results));
  }
  for (const { file, comparison } of comparisons) files.set(`comparisons/${stemOf(file)}.json`, json(comparisonJson(comparison)));
  // Charts load vega on demand: it is large, and only records and --chart need it.
  const { fanChartSpec } = await import('../report/charts.js');
  const { renderSvg } = await import('../report/render-svg.js');
  for (const { file, results } of forecasts) {
    const title = results.length > 1 ? `${ws.name}: ${stemOf(file)} — alternatives compared` : results[0]!.scenario.name;
    files.set(`charts/${stemOf(file)}.svg`, await renderSvg(fanChartSpec(results, title)));
  }
  files.set('changes.json', json(changes));
  files.set('scores.json', json(scores));
  files.set('manifest.json', json({
    format: 'sere-record',
    format_version: 1,
    tool_version: TOOL_VERSION,
    workspace: ws.name,
    date: options.date,
    previous: options.previous?.name ?? null,
    scored: (options.earlier ?? []).map((r) => r.name),
    data: { files: ws.surveys, sha256: fit.input.sha256, sites: fit.sites.length, transitions: fit.transitions },
    scenarios: ws.scenarios.map((rel) => ({ file: rel, seed: seeds[rel] })),
    contents: [...files.keys()].sort(),
  }));
  return { fit, forecasts, comparisons, changes, scores, seeds, files };
}

