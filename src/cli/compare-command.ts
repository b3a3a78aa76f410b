import type { Command } from 'commander';
import { SereError } from '../errors.js';
import { loadScenarios } from '../scenario/load-scenario.js';
import { checkComparable } from '../scenario/comparable.js';
import { runComparison } from '../engine/compare.js';
import { checkScenarios } from '../engine/check-treatments.js';
import { comparisonJson } from '../report/compare-json.js';
import { comparisonTable } from '../report/compare-table.js';
import { makeStyle } from '../report/style.js';
import { seededRandom } from '../uncertainty/random.js';
import type { Io } from './io.js';
import { positiveInteger } from './parse-options.js';
import { progressReporter } from './progress.js';
import { chooseSeed } from './seed.js';

interface CompareOptions {
  seed?: number;
  draws?: number;
  json?: boolean;
}

export function registerCompare(program: Command, io: Io): void {
  program.command('compare')
    .description('compare management alternatives on common random numbers (the first is the baseline)')
    .argument('<scenario.yaml...>', 'scenario files, or one file listing alternatives')
    .option('--seed <n>', "random seed (overrides the baseline's)", positiveInteger)
    .option('--draws <n>', "number of matrix draws (overrides the scenarios')", positiveInteger)
    .option('--json', 'print the documented JSON on stdout instead of tables')
    .action((files: string[], opts: CompareOptions) => {
      const scenarios = files.flatMap((file) => loadScenarios(file))
        .map((s) => (opts.draws ? { ...s, draws: opts.draws } : s));
      if (scenarios.length < 2) {
        throw new SereError('BAD_SCENARIO', 'only one alternative to compare', { file: files[0] },
          'name two or more scenario files, or list alternatives in the file');
      }
      checkComparable(scenarios);
      checkScenarios(scenarios);
      const seed = chooseSeed(scenarios[0]!, opts.seed, io);
      const progress = progressReporter(io.progress, 'comparing');
      let comparison;
      try {
        comparison = runComparison(scenarios, seededRandom(seed), progress.update);
      } finally {
        progress.stop();
      }
      io.stdout(opts.json ? JSON.stringify(comparisonJson(comparison), null, 2) + '\n' : comparisonTable(comparison, makeStyle(io.color)));
    });
}
