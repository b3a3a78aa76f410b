import type { Command } from 'commander';
import { join } from 'node:path';
import type { Scenario } from '../scenario/scenario.js';
import { SereError } from '../errors.js';
import { checkComparable } from '../scenario/comparable.js';
import { runComparison } from '../engine/compare.js';
import { comparisonJson } from '../report/compare-json.js';
import { comparisonTable } from '../report/compare-table.js';
import { makeStyle } from '../report/style.js';
import { randomStreams } from '../uncertainty/random.js';
import type { Io } from './io.js';
import { countScenarioStacks } from './scenario-stacks.js';
import { workspaceScenarios } from './workspace-scenario.js';
import { loadAndCheck, withRunOptions, writeChart, writeCsv, type RunOptions } from './scenario-run.js';
import { tidyCsv } from '../report/tidy-csv.js';
import { progressReporter } from './progress.js';
import { chooseSeed } from './seed.js';

/** The comparison's name in chart titles: the file's name when every alternative shares it, else the files'. */
function chartTitle(results: readonly { scenario: { name: string; alternative?: string } }[]): string {
  // An alternative's name is "<file's name>: <alternative>"; the file's name is what they share.
  const names = [...new Set(results.map(({ scenario: s }) =>
    s.alternative && s.name.endsWith(`: ${s.alternative}`) ? s.name.slice(0, -(s.alternative.length + 2)) : s.name))];
  return names.join(' · ');
}

/**
 * One folder per alternative under `folder`, named for the alternative (or the scenario) with only
 * letters, digits, _ . - kept; two that would share a folder are refused before anything runs.
 */
function mapFolders(scenarios: readonly Scenario[], folder: string): string[] {
  const folders = scenarios.map((s) => join(folder, (s.alternative ?? s.name).replace(/[^A-Za-z0-9_.-]+/g, '_')));
  folders.forEach((f, n) => {
    const same = folders.findIndex((g) => g.toLowerCase() === f.toLowerCase());
    if (same !== n) {
      throw new SereError('BAD_OPTION', `alternatives '${scenarios[same]!.alternative ?? scenarios[same]!.name}' and '${scenarios[n]!.alternative ?? scenarios[n]!.name}' would both write their maps to ${f}`,
        { path: '--maps' }, 'give the alternatives names that differ in letters or digits');
    }
  });
  return folders;
}

export function registerCompare(program: Command, io: Io): void {
  withRunOptions(program.command('compare')
    .description('compare management alternatives on common random numbers (the first is the baseline)'))
    .option('--difference-chart <file.svg>', "also draw each alternative's difference from the baseline at the horizon (SVG), by state")
    .option('--maps <folder>', 'with a raster stack as data: write each alternative\'s probability maps and expected-area.csv into its own folder FOLDER/<alternative>')
    .action(async (files: string[], opts: RunOptions & { maps?: string }) => {
      const scenarios = loadAndCheck(files, opts, { rasters: await countScenarioStacks(files, io.progress), workspace: workspaceScenarios(io) });
      if (scenarios.length < 2) {
        throw new SereError('BAD_SCENARIO', 'only one alternative to compare', { file: files[0], path: 'alternatives' },
          'name two or more scenario files, or list alternatives in the file');
      }
      checkComparable(scenarios);
      const maps = opts.maps === undefined ? undefined : await import('./raster-data.js');
      const folders = opts.maps === undefined ? [] : mapFolders(scenarios, opts.maps);
      scenarios.forEach((s, n) => maps?.checkMapsScenario([s], folders[n]!, Boolean(opts.force)));
      const seed = chooseSeed(scenarios[0]!, opts.seed, io);
      const progress = progressReporter(io.progress, 'comparing');
      let comparison;
      try {
        comparison = runComparison(scenarios, randomStreams(seed), progress.update, { everyYear: Boolean(opts.chart || opts.csv) },
          { threads: opts.threads });
      } finally {
        progress.stop();
      }
      const results = [comparison.baseline, ...comparison.alternatives.map((a) => a.result)];
      if (opts.chart) {
        await writeChart(opts.chart, (c) => c.fanChartSpec(results, `${chartTitle(results)}: ${results.length} alternatives compared`, { baseline: true }), Boolean(opts.force), io);
      }
      if (opts.differenceChart) {
        const title = `${chartTitle(results)}: ${results.length} alternatives compared, differences`;
        await writeChart(opts.differenceChart, (c) => c.differenceChartSpec(comparison, title), Boolean(opts.force), io);
      }
      if (opts.csv) {
        writeCsv(opts.csv, tidyCsv(results, comparison), Boolean(opts.force), io);
      }
      // Every alternative's maps from the comparison's seed: common random numbers, as its bands.
      for (const [n, s] of scenarios.entries()) if (maps) await maps.writeScenarioMaps(s, folders[n]!, randomStreams(seed), io);
      io.stdout(opts.json ? JSON.stringify(comparisonJson(comparison), null, 2) + '\n' : comparisonTable(comparison, makeStyle(io.color)));
    });
}
