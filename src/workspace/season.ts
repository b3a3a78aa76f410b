import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { WORKBOOK } from '../data/read-spreadsheet.js';
import { recordsOf } from '../data/survey-rows.js';
import type { Fit } from '../fit/fit.js';
import { estimateFit, type FitEstimates } from '../fit/estimate.js';
import { loadScenarios } from '../scenario/load-scenario.js';
import { checkComparable } from '../scenario/comparable.js';
import type { Scenario } from '../scenario/scenario.js';
import { checkScenarios } from '../engine/check-treatments.js';
import { runForecast, type ForecastResult } from '../engine/forecast.js';
import { runComparison, type Comparison } from '../engine/compare.js';
import { SereError } from '../errors.js';
import { randomStreams } from '../uncertainty/random.js';
import { WORKSPACE_FILE, type Workspace } from './workspace.js';
import { fitWorkspace, sampledForSeason } from './workspace-fit.js';
import { movedStart, rerunFromStart } from './rerun-from-start.js';
import { changesSince, type Changes, type StoredForecast } from './changes.js';
import { scoreRecord, type RecordScores, type ScorableRecord } from './score-records.js';

export interface SeasonOptions {
  /** The record's date, YYYY-MM-DD. */
  readonly date: string;
  /** Seeds by scenario file (a replay uses the record's); otherwise the scenario's, the workspace's, or `fallbackSeed`. */
  readonly seeds?: Readonly<Record<string, number>>;
  /** The seed for files that name none, chosen (and so printable) where the run starts. */
  readonly fallbackSeed?: number;
  /** The previous record, read back, to say what changed. */
  readonly previous?: { readonly name: string; readonly chain: Fit; readonly forecasts: readonly StoredForecast[] };
  /** Earlier records whose forecasts are scored against the surveys made since. */
  readonly earlier?: readonly ScorableRecord[];
  /** The seed of the scoring stream (a replay passes the record's); otherwise the workspace's or `fallbackSeed`. */
  readonly scoresSeed?: number;
}

/** A season's results, ready to be written as a record (report/record-files.ts) and printed. */
export interface SeasonRun {
  readonly workspace: { readonly name: string; readonly surveys: readonly string[]; readonly scenarios: readonly string[] };
  /** The record's date, YYYY-MM-DD. */
  readonly date: string;
  readonly previous: string | null;
  /** Earlier records scored. */
  readonly scored: readonly string[];
  readonly scoresSeed: number | null;
  /** The exact inputs, by workspace path: the workspace file, survey tables, label map, error table and scenario files (workbooks as bytes). */
  readonly inputs: ReadonlyMap<string, string | Buffer>;
  readonly fit: Fit;
  readonly estimates: FitEstimates;
  readonly forecasts: readonly { readonly file: string; readonly results: readonly ForecastResult[] }[];
  readonly comparisons: readonly { readonly file: string; readonly comparison: Comparison }[];
  readonly changes: Changes | null;
  readonly scores: readonly RecordScores[];
  readonly seeds: Readonly<Record<string, number>>;
}


/**
 * One season: refit from the workspace's current surveys, rerun every scenario (and compare the
 * alternatives of files that list several), and assemble the record — the fit, the exact inputs,
 * JSON summaries, tidy CSV tables, what changed, and a manifest of hashes, seeds and version.
 * Paths inside outputs are relative to the workspace, so a record reruns identically elsewhere.
 */
export async function runSeason(ws: Workspace, options: SeasonOptions): Promise<SeasonRun> {
  const { table, fit: unsampled } = fitWorkspace(ws);

  const seeds: Record<string, number> = {};
  const byFile = ws.scenarios.map((rel) => {
    const scenarios = loadScenarios(join(ws.root, rel), { fit: unsampled }).map((s): Scenario => ({ ...s, file: rel }));
    const seed = options.seeds?.[rel] ?? scenarios[0]!.seed ?? ws.seed ?? options.fallbackSeed;
    if (seed === undefined) {
      throw new SereError('BAD_RECORD', `no seed is recorded for scenario ${rel}`, { file: 'manifest.json', path: 'scenarios' }, 'rerun the season instead of replaying it');
    }
    seeds[rel] = seed;
    return { file: rel, scenarios };
  });
  // One run of the posterior sampler, when the fit needs one, serves the record's fit summary and every scenario (workspace-fit.ts).
  const fit = byFile.length > 0 ? sampledForSeason(unsampled, seeds[byFile[0]!.file]!) : unsampled;
  for (const b of byFile) b.scenarios = b.scenarios.map((s) => ({ ...s, fit }));
  const estimates = estimateFit(fit, 0.9);
  for (const { scenarios } of byFile) {
    checkScenarios(scenarios);
    if (scenarios.length > 1) checkComparable(scenarios);
  }
  const forecasts = byFile.map(({ file, scenarios }) => ({
    // A stratified scenario's record keeps each zone's own bands too (as sere forecast --zones), run after the landscape's on its streams.
    file, results: scenarios.map((s) => runForecast(s, randomStreams(seeds[file]!), undefined, {}, { zones: true })),
  }));
  const comparisons = byFile.filter((b) => b.scenarios.length > 1)
    .map(({ file, scenarios }) => ({ file, comparison: runComparison(scenarios, randomStreams(seeds[file]!)) }));
  const changes = options.previous ? changesSince(options.previous.name, options.previous, fit, estimates.mle,
    forecasts.flatMap((f) => f.results), fromPreviousStart(ws, fit, options.previous.chain, seeds, forecasts.flatMap((f) => f.results))) : null;

  const earlier = options.earlier ?? [];
  const scoresSeed = earlier.length === 0 ? undefined : options.scoresSeed ?? ws.seed ?? options.fallbackSeed;
  if (earlier.length > 0 && scoresSeed === undefined) {
    throw new SereError('BAD_RECORD', 'no seed is recorded for scoring earlier records', { file: 'manifest.json', path: 'scores_seed' },
      'rerun the season instead of replaying it');
  }
  const scoring = scoresSeed === undefined ? undefined : randomStreams(scoresSeed);
  const current = { states: table.states, records: recordsOf(table) };
  const scores = earlier.flatMap((r) => scoreRecord(r, current, scoring!) ?? []);

  const inputs = new Map<string, string | Buffer>();
  for (const rel of [WORKSPACE_FILE, ...ws.surveys, ...(ws.labels !== undefined ? [ws.labels] : []), ...(ws.errors !== undefined ? [ws.errors] : []), ...ws.scenarios]) inputs.set(rel, WORKBOOK.test(rel) ? readFileSync(join(ws.root, rel)) : readFileSync(join(ws.root, rel), 'utf8'));
  return {
    workspace: { name: ws.name, surveys: ws.surveys, scenarios: ws.scenarios }, date: options.date,
    previous: options.previous?.name ?? null, scored: earlier.map((r) => r.name), scoresSeed: scoresSeed ?? null,
    inputs, fit, estimates, forecasts, comparisons, changes, scores, seeds,
  };
}

/**
 * Every scenario file rerun with the new fit from the previous record's start (rerun-from-start.ts),
 * on this season's seeds; none when the previous start holds a state this fit does not know. When
 * the start did not move, this season's own results are that rerun. A file that no longer loads from the old
 * start (a treatment year now before it, say) is left out, and its change is not split.
 */
function fromPreviousStart(ws: Workspace, fit: Fit, previous: Fit, seeds: Readonly<Record<string, number>>,
  current: readonly ForecastResult[]): readonly ForecastResult[] {
  // With an error table each draw starts from its own sweep's true mix, which the previous record's
  // recorded mix cannot stand in for: the move is not split (changes.json then has null effects).
  if (fit.errorModel) return [];
  const moved = movedStart(previous, fit);
  if (!moved) return [];
  if (moved === fit) return current;
  return ws.scenarios.flatMap((rel) => {
    try {
      return rerunFromStart(join(ws.root, rel), rel, moved, randomStreams(seeds[rel]!));
    } catch (err) {
      if (err instanceof SereError) return [];
      throw err;
    }
  });
}
