import { existsSync, readdirSync } from 'node:fs';
import { basename, dirname, join, relative, resolve } from 'node:path';
import * as z from 'zod';
import { SereError, quote } from '../../errors.js';
import { readStructured, type KeyPath } from '../read-structured.js';
import { labelProblem, normaliseLabel } from '../labels.js';
import { readLabelMap, SKIP_LABEL } from '../label-map.js';

/** What a class code may map to besides a state: left out, like nodata (the label map's word). */
export const SKIP = SKIP_LABEL;

const wholeYear = /^-?\d{1,9}$/;

/**
 * A raster stack file (YAML): one classified raster per survey year, either listed
 * (`rasters: { 2015: lc2015.tif, … }`) or found by a file-name pattern (`pattern: lc{year}.tif`,
 * optionally with the `years` that must all be there); an optional zone raster; an optional
 * `labels` map from class code to state (or `skip`). Paths are relative to the stack file.
 */
const stackSchema = z.strictObject({
  rasters: z.record(z.string().regex(wholeYear, { error: 'a raster is keyed by its survey year, a whole number' }),
    z.string().min(1, { error: 'name the raster file' })).optional()
    .describe('Survey year → classified GeoTIFF (relative to this file).'),
  pattern: z.string().regex(/^[^{}]*\{year\}[^{}]*$/, { error: 'pattern must contain {year} once, e.g. lc{year}.tif' }).optional()
    .describe('File-name pattern with {year}, relative to this file; every match is a survey year.'),
  years: z.array(z.number().int({ error: 'years are whole numbers' })).min(2, { error: 'list at least two years' }).optional()
    .describe('With pattern: the years that must be present (a missing one is an error).'),
  zones: z.string().min(1).optional().describe('Optional zone raster (whole-number zone codes) on the same grid: one group per zone.'),
  labels: z.union([
    z.string().min(1),
    z.record(z.string().regex(/^\d{1,10}$/, { error: 'a label key is a class code, a whole number 0 or more' }),
      z.string().min(1, { error: 'map each class code to a state, or to skip' })),
  ], { error: 'labels is a label-map file (labels.yaml) or a map of class codes to states' }).optional()
    .describe('Class code → state name (or skip), inline or as a label-map file relative to this file (the same format as --labels). Without it, each code is its own state, named by its number.'),
}).refine((s) => (s.rasters === undefined) !== (s.pattern === undefined), { error: 'give exactly one of rasters or pattern' })
  .refine((s) => s.years === undefined || s.pattern !== undefined, { error: 'years goes with pattern (rasters already names the years)' });

export interface StackRaster {
  readonly year: number;
  /** Relative to the working folder, as shown in messages. */
  readonly file: string;
  readonly path: KeyPath;
}

/** A raster stack description, resolved: rasters in year order, files checked to exist. */
export interface RasterStack {
  readonly file: string;
  readonly sha256: string;
  readonly rasters: readonly StackRaster[];
  readonly zones?: string;
  /** Class code → state name or SKIP; absent: codes are their own states. */
  readonly labels?: ReadonlyMap<number, string>;
  /** The label-map file the labels came from, when not inline (its bytes are part of the stack's hash). */
  readonly labelsFile?: string;
  /** Where keys are, for messages. */
  readonly locate: (path: KeyPath) => { file?: string; line?: number; column?: number; path?: string };
}

/** Whether a data file names a raster stack (a YAML file) rather than a survey table or fit file. */
export function isRasterStackFile(file: string): boolean {
  return /\.ya?ml$/i.test(file);
}

export function readRasterStack(file: string): RasterStack {
  const { value, sha256, locate } = readStructured(file, stackSchema, 'raster stack file', 'BAD_RASTER');
  const near = (name: string): string => relative(process.cwd(), resolve(dirname(file), name));
  const place = (path: KeyPath) => ({ ...locate(path), path: path.join('.') });
  let rasters: StackRaster[];
  if (value.rasters) {
    rasters = Object.entries(value.rasters).map(([year, name]) => ({ year: Number(year), file: near(name), path: ['rasters', Number(year)] }));
  } else {
    rasters = byPattern(file, value.pattern!, value.years, near, place);
  }
  rasters.sort((a, b) => a.year - b.year);
  if (rasters.length < 2) {
    throw new SereError('BAD_RASTER', `names ${rasters.length} raster${rasters.length === 1 ? '' : 's'}; transitions need two years or more`,
      place([value.rasters ? 'rasters' : 'pattern']), 'list one classified raster per survey year');
  }
  for (const r of rasters) {
    if (!existsSync(r.file)) {
      throw new SereError('FILE_NOT_FOUND', `the raster for ${r.year} was not found (${r.file})`, place(r.path),
        'check the file name, or remove that year');
    }
  }
  const zones = value.zones === undefined ? undefined : near(value.zones);
  if (zones !== undefined && !existsSync(zones)) {
    throw new SereError('FILE_NOT_FOUND', `the zone raster was not found (${zones})`, place(['zones']), 'check the file name, or remove zones');
  }
  if (typeof value.labels === 'string') {
    const labelsFile = near(value.labels);
    if (!existsSync(labelsFile)) {
      throw new SereError('FILE_NOT_FOUND', `the label map was not found (${labelsFile})`, place(['labels']), 'check the file name, or write the labels inline');
    }
    return { file, sha256, rasters, zones, labels: classCodes(labelsFile), labelsFile, locate: place };
  }
  return { file, sha256, rasters, zones, labels: value.labels && labelMap(value.labels, place), locate: place };
}

function byPattern(file: string, pattern: string, years: readonly number[] | undefined, near: (name: string) => string,
  place: (path: KeyPath) => object): StackRaster[] {
  const folder = resolve(dirname(file), dirname(pattern));
  const namePattern = basename(pattern);
  if (years) {
    const seen = new Set<number>();
    return years.map((year, n) => {
      if (seen.has(year)) throw new SereError('BAD_RASTER', `year ${year} is listed twice`, place(['years', n]), 'list each year once');
      seen.add(year);
      const name = join(dirname(pattern), namePattern.replace('{year}', String(year)));
      const raster = near(name);
      if (!existsSync(raster)) {
        throw new SereError('FILE_NOT_FOUND', `no raster for ${year}: ${raster} was not found`, place(['years', n]),
          `add the ${year} raster, or drop ${year} from years`);
      }
      return { year, file: raster, path: ['years', n] };
    });
  }
  const [before, after] = namePattern.split('{year}') as [string, string];
  const match = new RegExp(`^${escapeRegex(before)}(-?\\d{1,9})${escapeRegex(after)}$`);
  const names = existsSync(folder) ? readdirSync(folder) : [];
  return names.flatMap((name) => {
    const m = match.exec(name);
    return m ? [{ year: Number(m[1]), file: near(join(dirname(pattern), name)), path: ['pattern'] }] : [];
  });
}

function labelMap(labels: Record<string, string>, place: (path: KeyPath) => object): Map<number, string> {
  const map = new Map<number, string>();
  for (const [code, raw] of Object.entries(labels)) {
    const state = normaliseLabel(raw);
    if (state !== SKIP) {
      const problem = labelProblem(state, () => `state ${quote(state)}`);
      if (problem) throw new SereError(problem.code, problem.what, place(['labels', Number(code)]), problem.hint);
    }
    const value = Number(code);
    if (map.has(value)) {
      throw new SereError('BAD_RASTER', `class code ${value} is listed twice (as ${code})`, place(['labels', Number(code)]), 'list each class code once');
    }
    map.set(value, state);
  }
  return map;
}

/** A label-map file (data/label-map.ts, the one reader) as class codes: every key must be a whole number. */
function classCodes(file: string): Map<number, string> {
  const read = readLabelMap(file);
  const map = new Map<number, string>();
  for (const [key, state] of read.targets) {
    const code = /^\d{1,10}$/.test(key) ? Number(key) : Number.NaN;
    if (Number.isNaN(code) || map.has(code)) {
      throw new SereError('BAD_RASTER', Number.isNaN(code) ? `label ${quote(key)} is not a class code (a whole number 0 or more)` : `class code ${code} is listed twice`,
        { file, line: read.lines.get(key) }, 'key a raster\'s label map by its class codes, once each');
    }
    // readLabelMap has checked every state it returns as a label.
    map.set(code, state ?? SKIP);
  }
  return map;
}

function escapeRegex(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}
