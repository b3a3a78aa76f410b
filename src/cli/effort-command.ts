import type { Command } from 'commander';
import { loadScenario } from '../scenario/load-scenario.js';
import { surveyEffort } from '../evaluation/survey-effort.js';
import { zoneSurveyEffort } from '../evaluation/zone-effort.js';
import { effortTable } from '../report/effort-table.js';
import { effortJson } from '../report/effort-json.js';
import { makeStyle } from '../report/style.js';
import { chooseSeed } from './seed.js';
import { randomStreams } from '../uncertainty/random.js';
import type { Io } from './io.js';
import { drawsFlag, replicatesFlag, seedFlag, wholeNumberList } from './parse-options.js';
import { LIMITS } from '../limits.js';
import { SereError } from '../errors.js';


export function registerEffort(program: Command, io: Io): void {
  program.command('effort')
    .description('how much narrower would the bands be with more sites or more seasons of surveys?')
    .argument('<scenario.yaml>', 'a scenario file (one scenario)')
    .option('--sites <a,b,...>', 'sites surveyed each future season (default: 1, 2 and 4 times the latest survey)', wholeNumberList(LIMITS.effortSites, '60,120,240'))
    .option('--seasons <a,b,...>', 'future seasons of surveys', wholeNumberList(LIMITS.effortSeasons, '1,2,5'), [1, 2, 5])
    .option('--replicates <n>', 'simulated futures per cell', replicatesFlag, 20)
    .option('--draws <n>', 'posterior draws per band', drawsFlag, 500)
    .option('--seed <n>', 'random seed (printed when not given)', seedFlag)
    .option('--json', 'print the documented JSON on stdout instead of tables')
    .action((file: string, opts: { sites?: number[]; seasons: number[]; replicates: number; draws: number; seed?: number; json?: boolean }) => {
      const scenario = loadScenario(file);
      if (scenario.fit.errorModel) {
        // The preposterior adds simulated surveys to the counts and redraws the posterior; with an
        // error table the posterior comes from the sampler's true paths, which added counts do not
        // reach — every cell would equal "now". Rerunning the sampler per cell and replicate is not built.
        throw new SereError('BAD_OPTION', 'sere effort adds simulated surveys to recorded counts, and this chain is fitted through an error table',
          { file, path: 'fit.errors' }, 'run sere effort on a copy of the scenario without fit.errors (its widths then take the records as the truth)');
      }
      const n = scenario.fit.latest.sites;
      const sites = opts.sites ?? [n, 2 * n, 4 * n];
      const seed = chooseSeed(scenario, opts.seed, io);
      const grid = { sites, seasons: opts.seasons };
      const options = { replicates: opts.replicates, draws: opts.draws, random: randomStreams(seed) };
      // A stratified scenario plans surveys by zone: sites split by area, each zone refitted (zone-effort.ts).
      const effort = scenario.zones ? zoneSurveyEffort(scenario, grid, options) : surveyEffort(scenario, grid, options);
      io.stdout(opts.json ? effortJson(scenario, effort, seed) : effortTable(scenario, effort, makeStyle(io.color)));
    });
}
