import type { Command } from 'commander';
import { loadScenario } from '../scenario/load-scenario.js';
import { surveyEffort } from '../evaluation/survey-effort.js';
import { zoneSurveyEffort } from '../evaluation/zone-effort.js';
import { EFFORT_SAMPLER, errorSurveyEffort } from '../evaluation/survey-effort-errors.js';
import { effortTable } from '../report/effort-table.js';
import { effortJson } from '../report/effort-json.js';
import { makeStyle } from '../report/style.js';
import { chooseSeed } from './seed.js';
import { workspaceScenarios } from './workspace-scenario.js';
import { randomStreams } from '../uncertainty/random.js';
import type { Io } from './io.js';
import { drawsFlag, replicatesFlag, seedFlag, wholeNumber, wholeNumberList } from './parse-options.js';
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
    .option('--chains <n>', 'with fit.errors: chains of the sampler rerun for "now" and every cell and replicate', wholeNumber(64), EFFORT_SAMPLER.chains)
    .option('--warm-up <n>', 'with fit.errors: sweeps dropped per chain of each rerun', wholeNumber(LIMITS.draws), EFFORT_SAMPLER.warmUp)
    .option('--retained <n>', 'with fit.errors: sweeps kept in all by each rerun (shared between chains)', wholeNumber(LIMITS.draws), EFFORT_SAMPLER.retained)
    .option('--thin <n>', 'with fit.errors: keep every n-th sweep after the warm-up', wholeNumber(1000), EFFORT_SAMPLER.thin)
    .option('--json', 'print the documented JSON on stdout instead of tables')
    .action((file: string, opts: { sites?: number[]; seasons: number[]; replicates: number; draws: number; seed?: number; json?: boolean; chains: number; warmUp: number; retained: number; thin: number }) => {
      const scenario = loadScenario(file, { workspace: workspaceScenarios(io) });
      const model = scenario.fit.errorModel;
      if (model && !model.records) {
        // The error model's posterior is rerun on the extended site records, which a fit file does not keep.
        throw new SereError('BAD_OPTION', 'sere effort with an error table reruns the sampler on the site records, and a fit file does not keep them',
          { file, path: 'data' }, 'name the survey table as data, with fit.errors, instead of the fit file');
      }
      const n = scenario.fit.latest.sites;
      const sites = opts.sites ?? [n, 2 * n, 4 * n];
      const seed = chooseSeed(scenario, opts.seed, io);
      const grid = { sites, seasons: opts.seasons };
      const options = { replicates: opts.replicates, draws: opts.draws, random: randomStreams(seed) };
      // A stratified scenario plans surveys by zone: sites split by area, each zone refitted (zone-effort.ts).
      // With an error table the fit's own sampler is rerun on the extended records (survey-effort-errors.ts).
      const sampler = { chains: opts.chains, warmUp: opts.warmUp, retained: opts.retained, thin: opts.thin };
      const effort = model ? errorSurveyEffort(scenario, grid, { ...options, sampler })
        : scenario.zones ? zoneSurveyEffort(scenario, grid, options) : surveyEffort(scenario, grid, options);
      io.stdout(opts.json ? effortJson(scenario, effort, seed) : effortTable(scenario, effort, makeStyle(io.color)));
    });
}
