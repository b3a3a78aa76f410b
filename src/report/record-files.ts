import { siteCount } from '../fit/fit.js';
import { fitToJson } from '../fit/fit-json.js';
import type { SeasonRun } from '../workspace/season.js';
import { stemOf } from '../workspace/record-names.js';
import { SCORE_DRAWS, SCORE_LEVEL } from '../workspace/score-records.js';
import { TOOL_VERSION } from '../version.js';
import { forecastJson } from './forecast-json.js';
import { comparisonJson } from './compare-json.js';
import { tidyCsv } from './tidy-csv.js';

/**
 * Every file of a season's record, by path inside it: the exact inputs, the fit, JSON summaries,
 * tidy CSV tables, charts, the one-page report, what changed, the scores and a manifest of hashes,
 * seeds and version. Paths inside outputs are relative to the workspace, so a record reruns
 * identically elsewhere. The workspace computes the season; this stage only writes it down.
 */
export async function recordFiles(run: SeasonRun): Promise<Map<string, string | Buffer>> {
  const { fit, estimates, forecasts, comparisons, changes, scores, seeds } = run;
  const ws = run.workspace;
  const files = new Map<string, string | Buffer>();
  const json = (x: unknown): string => JSON.stringify(x, null, 2) + '\n';
  for (const [rel, text] of run.inputs) files.set(`inputs/${rel}`, text);
  files.set('fit.json', json(fitToJson(fit, estimates)));
  for (const { file, results } of forecasts) {
    files.set(`forecasts/${stemOf(file)}.json`, json(forecastJson(results)));
    // The same writer as `--csv`: a compared file's table also holds the differences and chances.
    files.set(`tables/${stemOf(file)}.csv`, tidyCsv(results, comparisons.find((c) => c.file === file)?.comparison));
  }
  for (const { file, comparison } of comparisons) files.set(`comparisons/${stemOf(file)}.json`, json(comparisonJson(comparison)));
  // Charts load vega on demand: it is large, and only records and --chart need it.
  const { fanChartSpec, differenceChartSpec } = await import('./charts.js');
  const { renderSvg } = await import('./render-svg.js');
  for (const { file, results } of forecasts) {
    const title = results.length > 1 ? `${ws.name}: ${stemOf(file)} — alternatives compared` : results[0]!.scenario.name;
    files.set(`charts/${stemOf(file)}.svg`, await renderSvg(fanChartSpec(results, title, { baseline: results.length > 1 })));
  }
  for (const { file, comparison } of comparisons) {
    files.set(`charts/differences/${stemOf(file)}.svg`,
      await renderSvg(differenceChartSpec(comparison, `${ws.name}: ${stemOf(file)} — differences from the baseline`)));
  }
  const data = { files: ws.surveys, sha256: fit.input.sha256, sites: siteCount(fit), transitions: fit.transitions };
  const { seasonReportHtml } = await import('./season-report.js');
  files.set('report.html', seasonReportHtml({
    workspace: ws.name, date: run.date, toolVersion: TOOL_VERSION, previous: run.previous, data, states: fit.states,
    sections: forecasts.map(({ file, results }) => ({
      file, seed: seeds[file]!, results,
      comparison: comparisons.find((c) => c.file === file)?.comparison,
      charts: [`charts/${stemOf(file)}.svg`, `charts/differences/${stemOf(file)}.svg`].flatMap((path) => {
        const svg = files.get(path);
        return typeof svg === 'string' ? [svg] : [];
      }),
    })),
  }));
  files.set('changes.json', json(changes));
  files.set('scores.json', json({
    format: 'sere-scores', format_version: 2, tool_version: TOOL_VERSION, seed: run.scoresSeed, draws: SCORE_DRAWS, level: SCORE_LEVEL,
    records: scores,
  }));
  files.set('manifest.json', json({
    format: 'sere-record',
    format_version: 2,
    tool_version: TOOL_VERSION,
    workspace: ws.name,
    date: run.date,
    previous: run.previous,
    scored: run.scored,
    scores_seed: run.scoresSeed,
    data,
    scenarios: ws.scenarios.map((rel) => ({ file: rel, seed: seeds[rel] })),
    contents: [...files.keys()].sort(),
  }));
  return files;
}
