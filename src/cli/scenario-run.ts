import type { Command } from 'commander';
import { loadScenarios } from '../scenario/load-scenario.js';
import type { Scenario } from '../scenario/scenario.js';
import { checkScenarios } from '../engine/check-treatments.js';
import { drawsFlag, seedFlag } from './parse-options.js';
import type { ForecastResult } from '../engine/forecast.js';
import type { Io } from './io.js';
import { writeFileAtomic } from './write-file.js';

/** The flags shared by commands that run scenarios. */
export interface RunOptions {
  seed?: number;
  draws?: number;
  json?: boolean;
  chart?: string;
  force?: boolean;
}

export function withRunOptions(command: Command): Command {
  return command
    .argument('<scenario.yaml...>', 'scenario files (a file may list alternatives)')
    .option('--seed <n>', 'random seed (overrides the scenario file)', seedFlag)
    .option('--draws <n>', 'number of matrix draws (overrides the scenario file)', drawsFlag)
    .option('--json', 'print the documented JSON on stdout instead of tables')
    .option('--chart <file.svg>', 'also draw a fan chart (SVG): shares by year with their bands, one panel per state')
    .option('--force', 'replace an existing --chart file');
}

/** Draw the fan chart of `results` to `file` (vega loaded only when asked). */
export async function writeChart(file: string, results: readonly ForecastResult[], title: string, force: boolean, io: Io): Promise<void> {
  const { fanChartSpec } = await import('../report/charts.js');
  const { renderSvg } = await import('../report/render-svg.js');
  writeFileAtomic(file, await renderSvg(fanChartSpec(results, title)), force);
  io.stderr(`wrote ${file}\n`);
}

/**
 * Load every scenario (one per alternative) and check its treatments on the fitted matrix before
 * anything runs or is printed, so a typo in the last file costs nothing. `--draws` applies to
 * scenarios that draw more than once.
 */
export function loadAndCheck(files: readonly string[], opts: RunOptions): Scenario[] {
  const scenarios = files.flatMap((file) => loadScenarios(file))
    .map((s) => (opts.draws && s.draws > 1 ? { ...s, draws: opts.draws } : s));
  checkScenarios(scenarios);
  return scenarios;
}
