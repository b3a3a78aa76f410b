import type { Command } from 'commander';
import { readSurveyCsv } from '../data/read-survey-csv.js';
import { fitSurvey } from '../fit/fit.js';
import { estimateFit } from '../fit/estimate.js';
import { fitToJson } from '../fit/fit-json.js';
import { parsePrior } from '../chain/prior.js';
import { parseImpossible } from '../fit/settings.js';
import { fitTable } from '../report/fit-table.js';
import { makeStyle } from '../report/style.js';
import type { Io } from './io.js';
import { commaList, level, positiveInteger } from './parse-options.js';
import { writeFileAtomic } from './write-file.js';

interface FitOptions {
  step: number;
  states?: string[];
  prior: string;
  impossible?: string[];
  siteColumn: string;
  timeColumn: string;
  stateColumn: string;
  groupColumn?: string;
  level: number;
  out?: string;
  force?: boolean;
  json?: boolean;
}

export function registerFit(program: Command, io: Io): void {
  program.command('fit')
    .description('fit a chain to a survey table (site,time,state): counts, estimates, stationary mix')
    .argument('<survey.csv>', 'long table, one row per site and survey')
    .option('--step <n>', 'time units one step spans (surveys every 5 years: 5)', positiveInteger, 1)
    .option('--states <a,b,c>', 'the states, in the order to report them; other labels are errors', commaList)
    .option('--prior <p>', 'prior pseudo-count per cell: jeffreys (0.5), uniform (1) or a number', 'jeffreys')
    .option('--impossible <from>to,...>', 'transitions that cannot happen (structural zeros)', commaList)
    .option('--site-column <name>', 'column holding the site', 'site')
    .option('--time-column <name>', 'column holding the survey time (whole numbers)', 'time')
    .option('--state-column <name>', 'column holding the state', 'state')
    .option('--group-column <name>', 'optional column holding a group (kept in the fit)')
    .option('--level <p>', 'credible level of the intervals', level, 0.9)
    .option('--out <fit.json>', 'write the fit to this file (never overwrites without --force)')
    .option('--force', 'replace an existing --out file')
    .option('--json', 'print the fit as JSON on stdout instead of tables')
    .action((file: string, opts: FitOptions) => {
      const columns = { site: opts.siteColumn, time: opts.timeColumn, state: opts.stateColumn, group: opts.groupColumn };
      const settings = {
        step: opts.step,
        prior: parsePrior(opts.prior, { path: '--prior' }),
        states: opts.states,
        impossible: parseImpossible(opts.impossible ?? [], { path: '--impossible' }),
        columns,
      };
      const fit = fitSurvey(readSurveyCsv(file, { columns, states: opts.states }), settings);
      const estimates = estimateFit(fit, opts.level);
      const json = JSON.stringify(fitToJson(fit, estimates), null, 2) + '\n';
      if (opts.out) {
        writeFileAtomic(opts.out, json, Boolean(opts.force));
        io.stderr(`wrote ${opts.out}\n`);
      }
      io.stdout(opts.json ? json : fitTable(fit, estimates, makeStyle(io.color)));
    });
}
