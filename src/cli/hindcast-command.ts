import type { Command } from 'commander';
import { surveyReadOptions } from '../fit/settings.js';
import { readSurveyCsv } from '../data/read-survey-csv.js';
import { isRasterStackFile } from '../data/raster/stack-file.js';
import { hindcast } from '../evaluation/hindcast.js';
import { hindcastTable } from '../report/hindcast-table.js';
import { hindcastJson } from '../report/hindcast-json.js';
import { makeStyle } from '../report/style.js';
import { flagSeed } from './seed.js';
import { randomStreams } from '../uncertainty/random.js';
import { fitSettingsFrom, withFitOptions, type FitFlags } from './fit-options.js';
import type { Io } from './io.js';
import { drawsFlag, level, seedFlag, wholeNumberList } from './parse-options.js';
import { LIMITS } from '../limits.js';
import { SereError } from '../errors.js';

interface HindcastOptions extends FitFlags {
  years: number[];
  draws: number;
  level: number;
  seed?: number;
  json?: boolean;
}


export function registerHindcast(program: Command, io: Io): void {
  withFitOptions(program.command('hindcast')
    .description('how far ahead can the chain be trusted? refit on the past, forecast surveys already made, score them')
    .argument('<survey.csv>', 'the survey table'))
    .option('--years <a,b,...>', 'years ahead to test (multiples of the step)', wholeNumberList(LIMITS.horizonSteps, '1,2,5'), [1, 2, 5])
    .option('--draws <n>', 'posterior draws per forecast', drawsFlag, 500)
    .option('--level <p>', 'credible level of the bands', level, 0.9)
    .option('--seed <n>', 'random seed (printed when not given)', seedFlag)
    .option('--json', 'print the documented JSON on stdout instead of tables')
    .action((file: string, opts: HindcastOptions) => {
      if (isRasterStackFile(file)) {
        throw new SereError('NO_SITE_COUNTS', 'a hindcast needs per-site data (each site\'s surveys), and a raster stack gives counts only', { file },
          'run the hindcast on a survey table (site,time,state); for maps, sample pixels into such a table first');
      }
      const settings = fitSettingsFrom(opts);
      // With --errors each origin fits the observer-error model and scores on the recorded scale (evaluation/hindcast.ts).
      for (const y of opts.years) {
        if (y % settings.step !== 0) throw new SereError('BAD_OPTION', `${y} years is not a whole number of ${settings.step}-year steps`, { path: '--years' }, `use multiples of ${settings.step}`);
      }
      const seed = flagSeed(opts.seed, io);
      const table = readSurveyCsv(file, surveyReadOptions(settings));
      const { cases, summary, originsLeftOut } = hindcast(table, settings, {
        horizons: opts.years.map((y) => y / settings.step), draws: opts.draws, level: opts.level, random: randomStreams(seed),
      });
      if (originsLeftOut > 0) {
        (io.notice ?? io.stderr)(`sere: ${file} has more survey times than the hindcast limit: the ${originsLeftOut} earliest were not used as forecast origins\n`);
      }
      io.stdout(opts.json
        ? hindcastJson({ file, seed, level: opts.level, step: settings.step, originsLeftOut, summary, cases, errors: settings.errors })
        : hindcastTable(file, summary, cases, opts.level, settings.step, makeStyle(io.color), settings.errors));
    });
}
