import { Option, type Command } from 'commander';
import { fitZoned, POOLINGS, type Pooling } from '../fit/zones.js';
import { zonedPooling } from '../fit/fit-from-file.js';
import { fitZonesTable } from '../report/fit-zones-table.js';
import { surveyReadOptions } from '../fit/settings.js';
import { readSurveyCsv } from '../data/read-survey-csv.js';
import { existsSync } from 'node:fs';
import { SereError } from '../errors.js';
import { fitSurvey, type Fit } from '../fit/fit.js';
import type { FitSettings } from '../fit/settings.js';
import { compareCodePoints } from '../data/code-points.js';
import { fitCounts } from '../fit/fit-counts.js';
import { isCountsFile } from '../data/counts-table.js';
import { readCountsCsv } from '../data/read-counts-csv.js';
import { groupOf, groupsOf } from '../fit/fit-from-file.js';
import { groupDifference } from '../diagnostics/group-difference.js';
import { fitGroupsTable } from '../report/fit-groups-table.js';
import { estimateFit } from '../fit/estimate.js';
import { fitToJson } from '../fit/fit-json.js';
import { fitTable } from '../report/fit-table.js';
import { longRunUnderPriors } from '../engine/prior-sensitivity.js';
import { makeStyle } from '../report/style.js';
import type { Io } from './io.js';
import { level } from './parse-options.js';
import { fitSettingsFrom, withFitOptions, type FitFlags } from './fit-options.js';
import { writeFileAtomic } from './write-file.js';
import { isRasterStackFile } from '../data/raster/stack-file.js';
import { fitRasterCounts, fitRasterZoned } from '../fit/fit-from-raster.js';
import { sampleFit, withSamplerOptions, type SamplerFlags } from './sample-fit.js';
import { sampleZonePooling } from './sample-zones.js';

interface FitOptions extends FitFlags, SamplerFlags {
  by?: string;
  pooling?: Pooling;
  level: number;
  out?: string;
  force?: boolean;
  json?: boolean;
}

export function registerFit(program: Command, io: Io): void {
  withSamplerOptions(withFitOptions(program.command('fit')
    .description('fit a chain to a survey table (site,time,state), a counts table (sere count) or a raster stack: counts, estimates, stationary mix')
    .argument('<survey.csv>', 'survey table: CSV or .xlsx, long (one row per site and survey) or wide (one column per survey time); a counts table, told by its header; or a raster stack file (.yaml), one classified GeoTIFF per year'))
    .option('--level <p>', 'credible level of the intervals', level, 0.9)
    .option('--out <fit.json>', 'write the fit to this file (never overwrites without --force)')
    .option('--force', 'replace an existing --out file')
    .option('--json', 'print the fit as JSON on stdout instead of tables')
    .option('--by <column>', 'one fit per value of this column, written as OUT-<value>.json (needs --out)')
    .addOption(new Option('--pooling <how>', 'zones of --group-column: partial (each zone its own matrix, shrunk toward shared rows), none (separate fits, in one file), complete (one pooled fit; the default)')
      .choices(POOLINGS)))
    .action(async (file: string, opts: FitOptions) => {
      const raster = isRasterStackFile(file);
      if (opts.by !== undefined && opts.pooling !== undefined) {
        throw new SereError('BAD_OPTION', '--by writes separate files; --pooling keeps the zones in one fit file', { path: '--pooling' },
          'use --group-column COLUMN --pooling none for separate fits in one file, or --by alone');
      }
      if (opts.by !== undefined && !raster) {
        fitByGroup(file, opts, io);
        return;
      }
      const settings = { ...fitSettingsFrom(opts), ...(opts.pooling ? { pooling: opts.pooling } : {}) };
      if (raster && (opts.by !== undefined || opts.groupColumn !== undefined)) {
        throw new SereError('BAD_OPTION', 'a raster stack has no columns: its groups are the zones of its zone raster', { path: opts.by !== undefined ? '--by' : '--group-column' },
          'name a zone raster in the stack file (zones: zones.tif); a scenario picks one zone with fit.group');
      }
      if (raster && (settings.labels !== undefined || settings.sheet !== undefined || settings.layout !== undefined)) {
        throw new SereError('BAD_OPTION', 'a raster stack names its class-code labels in the stack file, and has no sheets or layout', { path: settings.labels !== undefined ? '--labels' : settings.sheet !== undefined ? '--sheet' : '--wide' },
          'map class codes to states under labels: in the stack file');
      }
      // The raster code (and the geotiff package) is loaded only for a stack.
      // Pooling's own refusals come before a stack's (slow) counting starts; a stack without a zone raster is refused after it.
      const pooling = zonedPooling(file, settings);
      const counted = raster ? await (await import('./count-blocks.js')).countStack(file, opts.blockSize, { path: '--block-size' }, io.progress) : undefined;
      const fit = sampleZonePooling(sampleZones(sampleFit(pooling && counted ? fitRasterZoned(counted, settings, pooling, { path: '--pooling' })
        : pooling ? fitZoned(readSurveyCsv(file, surveyReadOptions(settings)), settings, pooling, { path: '--pooling' })
        : counted ? fitRasterCounts(counted, settings)
          : isCountsFile(file) ? fitCounts(readCountsCsv(file, { states: opts.states }), settings)
            : fitSurvey(readSurveyCsv(file, surveyReadOptions(settings)), settings), opts, io), opts, io), opts, io);
      if (counted) io.stderr((await import('./raster-data.js')).stackSummary(counted, fit));
      const estimates = estimateFit(fit, opts.level);
      // The JSON only when it is printed or written: with 10⁶ sites it took 0.9 s (measured on 10⁷ rows).
      const json = opts.json || opts.out ? JSON.stringify(fitToJson(fit, estimates), null, 2) + '\n' : '';
      // Everything printed is made before anything is written: a failure leaves no file behind.
      const style = makeStyle(io.color);
      const printed = opts.json ? json : fitTable(fit, estimates, style, longRunUnderPriors(fit)) + (fit.zones ? fitZonesTable(fit, style) : '');
      if (opts.out) {
        writeFileAtomic(opts.out, json, Boolean(opts.force));
        io.stderr(`wrote ${opts.out}\n`);
      }
      io.stdout(printed);
    });
}

/** Each zone's own gap sampler, run as --by runs it, so `--pooling none` holds the fits --by writes. */
function sampleZones(fit: Fit, flags: SamplerFlags, io: Io): Fit {
  if (!fit.zones) return fit;
  return { ...fit, zones: { ...fit.zones, zones: fit.zones.zones.map((z) => ({ name: z.name, fit: sampleFit(z.fit, flags, io) })) } };
}

/**
 * `--by COLUMN`: one fit per group, all with the whole table's states, written next to --out as
 * OUT-<group>.json. Every target is checked before anything is written, so a refusal to overwrite
 * leaves no partial set; then a table of the groups and the test of whether they differ.
 */
function fitByGroup(file: string, opts: FitOptions, io: Io): void {
  if (!opts.out) {
    throw new SereError('BAD_OPTION', '--by writes one file per group and needs --out', { path: '--by' },
      'add --out NAME.json; the groups go to NAME-<group>.json');
  }
  const flags = fitSettingsFrom(opts);
  const settings = { ...flags, columns: { ...flags.columns, group: opts.by } };
  const { whole, fits } = isCountsFile(file) ? countsByGroup(file, settings, opts.states) : surveyByGroup(file, settings, opts.by!);
  const stem = opts.out.replace(/\.json$/i, '');
  const groups = fits.map(({ group, fit }) => ({ group, fit: sampleFit(fit, opts, io), out: `${stem}-${group.replace(/[^A-Za-z0-9_.-]/g, '_')}.json` }));
  groups.forEach((g, n) => {
    const same = groups.findIndex((h) => h.out.toLowerCase() === g.out.toLowerCase());
    if (same !== n) {
      throw new SereError('BAD_OPTION', `groups '${groups[same]!.group}' and '${g.group}' would both be written to ${g.out}`,
        { file, path: opts.by }, 'rename one of the groups in the survey table (file names keep only letters, digits, _ . -)');
    }
  });
  for (const g of groups) {
    if (existsSync(g.out) && !opts.force) {
      throw new SereError('FILE_EXISTS', 'already exists and was left untouched (no group was written)', { file: g.out },
        'choose another --out, or pass --force to replace the files');
    }
  }
  const texts = groups.map((g) => JSON.stringify(fitToJson(g.fit, estimateFit(g.fit, opts.level)), null, 2) + '\n');
  const printed = fitGroupsTable(file, opts.by!, groups, groupDifference(whole), makeStyle(io.color));
  groups.forEach((g, n) => writeFileAtomic(g.out, texts[n]!, true));
  io.stdout(printed);
}

interface GroupFits {
  readonly whole: Fit;
  readonly fits: readonly { readonly group: string; readonly fit: Fit }[];
}

function surveyByGroup(file: string, settings: FitSettings, column: string): GroupFits {
  const table = readSurveyCsv(file, surveyReadOptions(settings));
  return { whole: fitSurvey(table, settings), fits: groupsOf(table).map((group) => ({ group, fit: fitSurvey(groupOf(table, group, column), settings) })) };
}

/**
 * A counts table counted by group (its site_group column): one fit per group, from that group's
 * rows, as fit-counts.ts fits one group for a scenario's fit.group. `--by` names the survey table's
 * group column, which the fits report; the counts table's own column is always site_group.
 */
function countsByGroup(file: string, settings: FitSettings, states: readonly string[] | undefined): GroupFits {
  const table = readCountsCsv(file, { states });
  if (!table.grouped) {
    throw new SereError('BAD_OPTION', '--by needs a counts table counted by group (with a site_group column)', { file, path: '--by' },
      'count the survey table again with --group-column, or run sere fit --by on the survey table');
  }
  const groups = [...new Set(table.cells.map((c) => c.group!))].sort(compareCodePoints);
  return { whole: fitCounts(table, settings), fits: groups.map((group) => ({ group, fit: fitCounts(table, { ...settings, group }) })) };
}
