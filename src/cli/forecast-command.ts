import type { Command } from 'commander';
import { loadScenarios } from '../scenario/load-scenario.js';
import { runForecast } from '../engine/forecast.js';
import { checkScenarios } from '../engine/check-treatments.js';
import { forecastJson } from '../report/forecast-json.js';
import { forecastTable } from '../report/forecast-table.js';
import { makeStyle } from '../report/style.js';
import { seededRandom } from '../uncertainty/random.js';
import { chooseSeed } from './seed.js';
import type { Io } from './io.js';
import { positiveInteger } from './parse-options.js';
import { progressReporter } from './progress.js';

interface ForecastOptions {
  seed?: number;
  draws?: number;
  json?: boolean;
}

export function registerForecast(program: Command, io: Io): void {
  program.command('forecast')
    .description('project the mix of states with credible bands, long-run mix and time to a landscape target')
    .argument('<scenario.yaml...>', 'one or more scenario files')
    .option('--seed <n>', "random seed (overrides the scenario's)", positiveInteger)
    .option('--draws <n>', "number of matrix draws (overrides the scenario's)", positiveInteger)
    .option('--json', 'print the documented JSON on stdout instead of tables')
    .action((files: string[], opts: ForecastOptions) => {
      // Load and check every scenario before running any, so a typo in the last one costs nothing.
      const scenarios = files.flatMap((file) => loadScenarios(file))
        .map((s) => (opts.draws && s.draws > 1 ? { ...s, draws: opts.draws } : s));
      checkScenarios(scenarios);
      // A file's alternatives share one seed, and so the same draws and event years.
      const seeds = new Map<string, number>();
      const results = scenarios.map((scenario) => {
        const seed = seeds.get(scenario.file) ?? chooseSeed(scenario, opts.seed, io);
        seeds.set(scenario.file, seed);
        const progress = progressReporter(io.progress, scenario.name);
        try {
          return runForecast(scenario, seededRandom(seed), progress.update);
        } finally {
          progress.stop();
        }
      });
      if (opts.json) {
        io.stdout(JSON.stringify(forecastJson(results), null, 2) + '\n');
        return;
      }
      const style = makeStyle(io.color);
      io.stdout(results.map((r) => forecastTable(r, style)).join('\n'));
    });
}
