import type { Command } from 'commander';
import { loadScenarios, type LoadOptions } from '../scenario/load-scenario.js';
import type { Scenario } from '../scenario/scenario.js';
import { checkScenarios } from '../engine/check-treatments.js';
import { drawsFlag, seedFlag, threadsFlag, variationFlag } from './parse-options.js';
import type { TopLevelSpec } from 'vega-lite';
import type { Io } from './io.js';
import { refuseExisting, writeFileAtomic } from './write-file.js';

/** The flags shared by commands that run scenarios. */
export interface RunOptions {
  seed?: number;
  draws?: number;
  threads?: number;
  /** Override the scenarios' year-to-year variation. */
  variation?: 'none' | 'estimated';
  json?: boolean;
  chart?: string;
  csv?: string;
  /** compare only: the chart of differences from the baseline at the horizon. */
  differenceChart?: string;
  force?: boolean;
}

export function withRunOptions(command: Command): Command {
  return command
    .argument('<scenario.yaml...>', 'scenario files (a file may list alternatives)')
    .option('--seed <n>', 'random seed (overrides the scenario file)', seedFlag)
    .option('--draws <n>', 'number of matrix draws (overrides the scenario file)', drawsFlag)
    .option('--threads <n>', 'threads to run on (default: every core for large runs, one for small ones); the results are the same for any number', threadsFlag)
    .option('--variation <none|estimated>', "year-to-year variation (overrides the scenario file): 'none' is the fixed-matrix chain", variationFlag)
    .option('--json', 'print the documented JSON on stdout instead of tables')
    .option('--chart <file.svg>', 'also draw a fan chart (SVG): shares by year with their bands, one panel per state')
    .option('--csv <file.csv>', 'also write the tidy CSV (README, "Tidy CSV"): shares in %, target chance and timing; for compare also differences and chances of more')
    .option('--force', 'replace an existing --chart or --csv file');
}

type Charts = typeof import('../report/charts.js');

/** Draw a chart to `file` as SVG; vega and the chart code are loaded only when a chart is asked for. */
export async function writeChart(file: string, make: (charts: Charts) => TopLevelSpec, force: boolean, io: Io): Promise<void> {
  const charts = await import('../report/charts.js');
  const { renderSvg } = await import('../report/render-svg.js');
  writeFileAtomic(file, await renderSvg(make(charts)), force);
  io.stderr(`wrote ${file}\n`);
}

/** Write the tidy CSV of a run to `file`, atomically (write-file.ts). */
export function writeCsv(file: string, csv: string, force: boolean, io: Io): void {
  writeFileAtomic(file, csv, force);
  io.stderr(`wrote ${file}\n`);
}

/**
 * Load every scenario (one per alternative) and check its treatments on the fitted matrix before
 * anything runs or is printed, so a typo in the last file costs nothing. `--draws` applies to
 * scenarios that draw more than once.
 */
export function loadAndCheck(files: readonly string[], opts: RunOptions, load: LoadOptions = {}): Scenario[] {
  refuseExisting([opts.chart, opts.csv, opts.differenceChart], Boolean(opts.force));
  // --variation goes in before loading: the draw count of a point scenario depends on it.
  const scenarios = files.flatMap((file) => loadScenarios(file, opts.variation === undefined ? load : { ...load, variation: opts.variation }))
    .map((s) => (opts.draws && s.draws > 1 ? { ...s, draws: opts.draws } : s));
  checkScenarios(scenarios);
  return scenarios;
}
