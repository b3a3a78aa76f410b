import type { Command } from 'commander';
import { readSurveyCsv } from '../data/read-survey-csv.js';
import { fitSurvey } from '../fit/fit.js';
import { estimateFit } from '../fit/estimate.js';
import { fitToJson } from '../fit/fit-json.js';
import { fitTable } from '../report/fit-table.js';
import { makeStyle } from '../report/style.js';
import type { Io } from './io.js';
import { level } from './parse-options.js';
import { fitSettingsFrom, withFitOptions, type FitFlags } from './fit-options.js';
import { writeFileAtomic } from './write-file.js';

interface FitOptions extends FitFlags {
  level: number;
  out?: string;
  force?: boolean;
  json?: boolean;
}

export function registerFit(program: Command, io: Io): void {
  withFitOptions(program.command('fit')
    .description('fit a chain to a survey table (site,time,state): counts, estimates, stationary mix')
    .argument('<survey.csv>', 'long table, one row per site and survey'))
    .option('--level <p>', 'credible level of the intervals', level, 0.9)
    .option('--out <fit.json>', 'write the fit to this file (never overwrites without --force)')
    .option('--force', 'replace an existing --out file')
    .option('--json', 'print the fit as JSON on stdout instead of tables')
    .action((file: string, opts: FitOptions) => {
      const settings = fitSettingsFrom(opts);
      const fit = fitSurvey(readSurveyCsv(file, { columns: settings.columns, states: opts.states }), settings);
      const estimates = estimateFit(fit, opts.level);
      const json = JSON.stringify(fitToJson(fit, estimates), null, 2) + '\n';
      if (opts.out) {
        writeFileAtomic(opts.out, json, Boolean(opts.force));
        io.stderr(`wrote ${opts.out}\n`);
      }
      io.stdout(opts.json ? json : fitTable(fit, estimates, makeStyle(io.color)));
    });
}
