import { extname } from 'node:path';
import { InvalidArgumentError, type Command } from 'commander';
import { SereError } from '../errors.js';
import { fitFromFile } from '../fit/fit-from-file.js';
import { isRasterStackFile } from '../data/raster/stack-file.js';
import { makeStyle } from '../report/style.js';
import { randomStreams } from '../uncertainty/random.js';
import { flagSeed } from './seed.js';
import { sampleZonePooling } from './sample-zones.js';
import { FIT_FLAG_KEYS, fitSettingsFrom, withFitOptions, type FitFlags } from './fit-options.js';
import { countStack } from './count-blocks.js';
import type { Io } from './io.js';
import { drawsFlag, level, replicatesFlag, seedFlag, yearsFlag } from './parse-options.js';

interface CheckOptions extends FitFlags {
  draws: number;
  seed?: number;
  level: number;
  replicates: number;
  simulate?: boolean;
  periods?: [number, number][];
  target?: string;
  horizon: number;
  json?: boolean;
}

/** `2015-2018,2019-2023` → [[2015, 2018], [2019, 2023]]: periods grouped by the year they start. */
function periodRanges(value: string): [number, number][] {
  return value.split(',').map((part) => {
    const m = /^\s*(-?\d+)\s*-\s*(-?\d+)\s*$/.exec(part);
    if (!m || Number(m[1]) > Number(m[2])) throw new InvalidArgumentError('expected ranges of start years such as 2015-2018,2019-2023.');
    return [Number(m[1]), Number(m[2])];
  });
}

export function registerCheck(program: Command, io: Io): void {
  const command = withFitOptions(program.command('check')
    .description('test the Markov assumptions and describe the chain: structure, passage times, settling, sensitivities')
    .argument('<survey.csv|counts.csv|fit.json>', 'a survey table or a counts table (fitted now, with the fit flags), a fit file, or a raster stack file (.yaml)'))
    .option('--draws <n>', 'posterior draws for the bands', drawsFlag, 1000)
    .option('--seed <n>', 'random seed (printed when not given)', seedFlag)
    .option('--level <p>', 'credible level of the bands', level, 0.9)
    .option('--replicates <n>', 'bootstrap replicates for simulated p-values', replicatesFlag, 999)
    .option('--simulate', 'give a simulated p-value for every test, not only sparse ones')
    .option('--periods <a-b,...>', 'group survey periods by start year, e.g. 2015-2018,2019-2023', periodRanges)
    .option('--target <state>', 'rank transitions by their effect on this state’s share')
    .option('--horizon <years>', 'with --target: the share this many years after the latest survey', yearsFlag, 20)
    .option('--json', 'print the documented JSON on stdout instead of tables');
  command.action(async (file: string, opts: CheckOptions) => {
    // Loaded on demand: the diagnostics bring mathjs, whose set-up would add ~0.1 s to every
    // other command's start (measured: `sere --version` 0.33 s with it loaded eagerly, 0.2 s without).
    const { checkChain } = await import('../diagnostics/check.js');
    const { checkJson } = await import('../report/check-json.js');
    const { checkTable } = await import('../report/check-table.js');
    const isFitFile = extname(file).toLowerCase() === '.json';
    const given = FIT_FLAG_KEYS.filter((name) => command.getOptionValueSource(name) === 'cli');
    if (isFitFile && given.length > 0) {
      throw new SereError('BAD_OPTION', `fit flags (${given.join(', ')}) apply to a survey table, not to a fit file`, { file, path: `--${given[0]!.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)}` },
        'drop them, or check the survey table itself');
    }
    // A raster stack is counted first (reading rasters is asynchronous); its fit holds counts only.
    const rasters = isRasterStackFile(file) ? new Map([[file, await countStack(file, undefined, { file }, io.progress)]]) : undefined;
    const fit = fitFromFile(file, fitSettingsFrom(opts), rasters);
    let target: { state: number; steps: number } | undefined;
    if (opts.target !== undefined) {
      const state = fit.states.indexOf(opts.target);
      if (state < 0) throw new SereError('UNKNOWN_STATE', `unknown state '${opts.target}'`, { path: '--target' }, `use one of: ${fit.states.join(', ')}`);
      if (opts.horizon % fit.step !== 0) {
        throw new SereError('BAD_OPTION', `${opts.horizon} years is not a whole number of ${fit.step}-year steps`, { path: '--horizon' }, `use a multiple of ${fit.step}`);
      }
      target = { state, steps: opts.horizon / fit.step };
    }
    const seed = flagSeed(opts.seed, io);
    // Partially pooled zones: their posterior sampler's diagnostics, as sere fit reports them (same seed, same numbers).
    const result = checkChain(sampleZonePooling(fit, { seed }, io), {
      level: opts.level, draws: opts.draws, replicates: opts.replicates, simulateAll: Boolean(opts.simulate),
      periodGroups: opts.periods, target,
    }, randomStreams(seed));
    io.stdout(opts.json ? JSON.stringify(checkJson(result), null, 2) + '\n' : checkTable(result, makeStyle(io.color)));
  });
}
