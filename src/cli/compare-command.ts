import type { Command } from 'commander';
import { SereError } from '../errors.js';
import { checkComparable } from '../scenario/comparable.js';
import { runComparison } from '../engine/compare.js';
import { comparisonJson } from '../report/compare-json.js';
import { comparisonTable } from '../report/compare-table.js';
import { makeStyle } from '../report/style.js';
import { randomStreams } from '../uncertainty/random.js';
import type { Io } from './io.js';
import { loadAndCheck, withRunOptions, writeChart, type RunOptions } from './scenario-run.js';
import { progressReporter } from './progress.js';
import { chooseSeed } from './seed.js';

export function registerCompare(program: Command, io: Io): void {
  withRunOptions(program.command('compare')
    .description('compare management alternatives on common random numbers (the first is the baseline)'))
    .action(async (files: string[], opts: RunOptions) => {
      const scenarios = loadAndCheck(files, opts);
      if (scenarios.length < 2) {
        throw new SereError('BAD_SCENARIO', 'only one alternative to compare', { file: files[0], path: 'alternatives' },
          'name two or more scenario files, or list alternatives in the file');
      }
      checkComparable(scenarios);
      const seed = chooseSeed(scenarios[0]!, opts.seed, io);
      const progress = progressReporter(io.progress, 'comparing');
      let comparison;
      try {
        comparison = runComparison(scenarios, randomStreams(seed), progress.update, { everyYear: Boolean(opts.chart) });
      } finally {
        progress.stop();
      }
      if (opts.chart) {
        const results = [comparison.baseline, ...comparison.alternatives.map((a) => a.result)];
        await writeChart(opts.chart, results, `${results.length} alternatives compared`, Boolean(opts.force), io);
      }
      io.stdout(opts.json ? JSON.stringify(comparisonJson(comparison), null, 2) + '\n' : comparisonTable(comparison, makeStyle(io.color)));
    });
}
