import type { Command } from 'commander';
import { parsePrior } from '../chain/prior.js';
import { parseImpossible, parseStep, type FitSettings } from '../fit/settings.js';
import { InvalidArgumentError } from 'commander';
import { LIMITS } from '../limits.js';
import { commaList } from './parse-options.js';

/** `--step 5` (time units) or `--step 1y` (years, with dates in the time column). */
function stepFlag(value: string): { step: number; dates: boolean } {
  const step = parseStep(value);
  if (!step || step.step > LIMITS.horizonSteps) {
    throw new InvalidArgumentError(`expected a whole number from 1 to ${LIMITS.horizonSteps}, or years of dated surveys such as 1y.`);
  }
  return step;
}

/** `--block-size 500` or `auto`; anything else is checked where the positions' extent is known (one message for every bad size). */
function blockSizeFlag(value: string): number | 'auto' {
  return value.trim() === 'auto' ? 'auto' : Number(value);
}

/** The flags that say how to fit a survey table, shared by `fit` and `check`. */
export interface FitFlags {
  /** Absent when not given: fitSettingsFrom applies the default (DEFAULT_STEP), so a counts table's own step can apply. */
  step?: { step: number; dates: boolean };
  states?: string[];
  prior: string;
  impossible?: string[];
  siteColumn: string;
  timeColumn: string;
  stateColumn: string;
  groupColumn?: string;
  observerColumn?: string;
  xColumn?: string;
  yColumn?: string;
  /** A side, or `auto` (chosen from the data; for a raster stack, count it in blocks). */
  blockSize?: number | 'auto';
  wide?: boolean;
  sheet?: string;
  labels?: string;
  errors?: string;
}

/** The option keys withFitOptions adds, to tell whether any was given. */
export const FIT_FLAG_KEYS = ['step', 'states', 'prior', 'impossible', 'siteColumn', 'timeColumn', 'stateColumn', 'groupColumn', 'observerColumn', 'xColumn', 'yColumn', 'blockSize', 'wide', 'sheet', 'labels', 'errors'] as const;

/** One time unit per step, unless --step says otherwise. */
export const DEFAULT_STEP = 1;

export function withFitOptions(command: Command): Command {
  return command
    .option('--step <n>', 'time units one step spans (surveys every 5 years: 5; default 1, or a counts table\'s own); 1y, 2y …: the time column holds dates YYYY-MM-DD, steps of years', stepFlag)
    .option('--states <a,b,c>', 'the states, in the order to report them; other labels are errors', commaList)
    .option('--prior <p>', 'prior pseudo-count per cell: jeffreys (0.5), uniform (1) or a number', 'jeffreys')
    .option('--impossible <from>to,...>', 'transitions that cannot happen (structural zeros)', commaList)
    .option('--site-column <name>', 'column holding the site', 'site')
    .option('--time-column <name>', 'column holding the survey time (whole numbers)', 'time')
    .option('--state-column <name>', 'column holding the state', 'state')
    .option('--group-column <name>', 'optional column holding a group (soil type, management unit)')
    .option('--observer-column <name>', 'with --errors: the column naming who made each survey, for one error matrix per observer named in the assessment (default: a column named observer, if any)')
    .option('--x-column <name>', 'optional column holding each site\'s easting (projected units, e.g. metres); with --y-column the bootstrap resamples spatial blocks')
    .option('--y-column <name>', 'optional column holding each site\'s northing (projected units)')
    .option('--block-size <n>', 'side of the spatial bootstrap\'s square blocks, in the positions\' units (pixels for a raster stack); default (or auto): twice the range of spatial autocorrelation of the latest states; a raster stack is counted in blocks only with this flag', blockSizeFlag)
    .option('--wide', 'the table is wide: one row per site, one column per survey time (detected when every other column is headed by a time)')
    .option('--sheet <name>', 'the worksheet of a spreadsheet (.xlsx) to read (default: the first)')
    .option('--labels <labels.yaml>', 'map recorded labels or class codes to states (or to skip)')
    .option('--errors <errors.csv>', 'observer error: an accuracy assessment (CSV recorded,verified,n); the chain is fitted to the true states behind the records');
}

export function fitSettingsFrom(opts: FitFlags): FitSettings {
  return {
    step: opts.step?.step ?? DEFAULT_STEP,
    dates: opts.step?.dates ?? false,
    ...(opts.step === undefined ? { stepDefaulted: true } : {}),
    prior: parsePrior(opts.prior, { path: '--prior' }),
    states: opts.states,
    impossible: parseImpossible(opts.impossible ?? [], { path: '--impossible' }),
    columns: {
      site: opts.siteColumn, time: opts.timeColumn, state: opts.stateColumn, group: opts.groupColumn,
      ...(opts.observerColumn !== undefined ? { observer: opts.observerColumn } : {}),
      ...(opts.xColumn !== undefined ? { x: opts.xColumn } : {}), ...(opts.yColumn !== undefined ? { y: opts.yColumn } : {}),
    },
    ...(typeof opts.blockSize === 'number' ? { blockSize: opts.blockSize } : {}),
    ...(opts.wide ? { layout: 'wide' as const } : {}),
    ...(opts.sheet !== undefined ? { sheet: opts.sheet } : {}),
    ...(opts.labels !== undefined ? { labels: opts.labels } : {}),
    ...(opts.errors !== undefined ? { errors: opts.errors } : {}),
  };
}
