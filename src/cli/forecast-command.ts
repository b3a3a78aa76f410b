import type { Command } from 'commander';
import { runForecast } from '../engine/forecast.js';
import { forecastJson } from '../report/forecast-json.js';
import { forecastTable } from '../report/forecast-table.js';
import { makeStyle } from '../report/style.js';
import { randomStreams } from '../uncertainty/random.js';
import { chooseSeed } from './seed.js';
import type { Io } from './io.js';
import { loadAndCheck, withRunOptions, writeChart, writeCsv, type RunOptions } from './scenario-run.js';
import { tidyCsv } from '../report/tidy-csv.js';
import { progressReporter } from './progress.js';
import { countScenarioStacks } from './scenario-stacks.js';
import { workspaceScenarios } from './workspace-scenario.js';

export function registerForecast(program: Command, io: Io): void {
  withRunOptions(program.command('forecast')
    .description('project the mix of states with credible bands, long-run mix and time to a landscape target'))
    .option('--zones', 'with a zoned fit (pooling partial or none): also each zone\'s own forecast, in the tables and JSON')
    .option('--maps <folder>', 'with a raster stack as data: write per-pixel probability maps (GeoTIFF, one per state and shown year) and expected-area.csv')
    .action(async (files: string[], opts: RunOptions & { maps?: string; zones?: boolean }) => {
      // Raster stacks named as data are counted first: reading them is asynchronous.
      const scenarios = loadAndCheck(files, opts, { rasters: await countScenarioStacks(files, io.progress), workspace: workspaceScenarios(io) });
      const maps = opts.maps === undefined ? undefined : await import('./raster-data.js');
      maps?.checkMapsScenario(scenarios, opts.maps!, Boolean(opts.force));
      // A file's alternatives share one seed, and so the same draws and event years.
      const seeds = new Map<string, number>();
      const results = scenarios.map((scenario) => {
        const seed = seeds.get(scenario.file) ?? chooseSeed(scenario, opts.seed, io);
        seeds.set(scenario.file, seed);
        const progress = progressReporter(io.progress, scenario.name);
        try {
          return runForecast(scenario, randomStreams(seed), progress.update, { threads: opts.threads }, { zones: Boolean(opts.zones) });
        } finally {
          progress.stop();
        }
      });
      if (opts.chart) {
        const title = results.length === 1 ? results[0]!.scenario.name : `${results.length} scenarios`;
        await writeChart(opts.chart, (c) => c.fanChartSpec(results, title), Boolean(opts.force), io);
      }
      if (opts.csv) writeCsv(opts.csv, tidyCsv(results), Boolean(opts.force), io);
      if (maps) await maps.writeScenarioMaps(scenarios[0]!, opts.maps!, randomStreams(seeds.get(scenarios[0]!.file)!), io);
      if (opts.json) {
        io.stdout(JSON.stringify(forecastJson(results), null, 2) + '\n');
        return;
      }
      const style = makeStyle(io.color);
      io.stdout(results.map((r) => forecastTable(r, style)).join('\n'));
    });
}
