import { basename, dirname, relative, resolve } from 'node:path';
import { LIMITS } from '../limits.js';
import { fitSettingsOf } from './fit-block.js';
import { SereError, quote, type Place } from '../errors.js';
import { normaliseLabel } from '../data/labels.js';
import { missingColumn } from '../data/survey-header.js';
import { readStructured, type KeyPath } from '../data/read-structured.js';
import { fitFromFile } from '../fit/fit-from-file.js';
import { carriedMix } from '../chain/latest-mix.js';
import { fitMle, fitMask, needPerSite, withBlockSize, type Fit } from '../fit/fit.js';
import { scenarioSchema, type ScenarioFile } from './schema.js';
import type { Disturbance, PlotScale, Scenario, ScenarioZones, Treatment } from './scenario.js';
import { observerKey } from '../data/read-error-matrix.js';
import { checkParcelZones, resolveZones, zoneIndices } from './resolve-zones.js';
import { resolveEvents, resolveTreatments, type ResolveContext } from './resolve-management.js';
import { largestRemainder } from './largest-remainder.js';
import { resolveTarget } from './resolve-target.js';
import type { RasterCounts } from '../data/raster/count-stack.js';
import { MIN_VARIATION_PERIODS, periodCount, type VariationSpec } from '../uncertainty/variation.js';

/** Explicit starting shares must sum to 1 within this (absolute); they are typed by hand. */
export const SHARES_SUM_TOLERANCE = 1e-9;

/** Years after the start shown when the scenario does not say (common reporting horizons). */
const DEFAULT_SHOW_YEARS = [5, 10, 20, 50];

export interface LoadOptions {
  /** A workspace's fit, used instead of the file's `data` and `fit` (which are then ignored). */
  readonly fit?: Fit;
  /** Raster stacks named as data, counted beforehand (cli/raster-data.ts), by path as `data` resolves. */
  readonly rasters?: ReadonlyMap<string, RasterCounts>;
  /** `--variation`: replaces the file's `variation` before anything that depends on it (the draw count). */
  readonly variation?: 'none' | 'estimated';
  /**
   * For a file that names no data: the fit of the workspace holding it, and the workspace's seed for a
   * file naming none (cli/workspace-scenario.ts), or undefined when it is in no workspace.
   */
  readonly workspace?: (file: string) => { readonly fit: Fit; readonly seed?: number } | undefined;
}

/** Load a scenario file that describes exactly one scenario (no `alternatives`). */
export function loadScenario(file: string, options: LoadOptions = {}): Scenario {
  const all = loadScenarios(file, options);
  if (all.length !== 1) {
    throw new SereError('BAD_SCENARIO', `lists ${all.length} alternatives, and this command takes one scenario`, { file, path: 'alternatives' },
      'give a file without alternatives (sere compare takes a file with them)');
  }
  return all[0]!;
}

/**
 * Load a scenario file: validate its shape (zod), fit or load its data (paths are relative to the
 * scenario file), then check every name and number against that fit, each error pointing at
 * file:line:column and the key path. A file with `alternatives` gives one scenario per
 * alternative (the first is the baseline), all sharing data, start, horizon and uncertainty.
 */
export function loadScenarios(file: string, options: LoadOptions = {}): Scenario[] {
  const { value: s, sha256, locate } = readStructured(file, scenarioSchema, 'scenario file', 'BAD_SCENARIO');
  const fail = (code: 'BAD_SCENARIO' | 'UNKNOWN_STATE' | 'BAD_SHARES', what: string, path: KeyPath, hint: string): never => {
    throw new SereError(code, what, locate(path), hint);
  };
  const fromWorkspace = options.fit === undefined && s.data === undefined ? options.workspace?.(file) : undefined;
  const data = options.fit ?? fromWorkspace?.fit ?? fitOfData(s, file, fail, locate, options.rasters);
  const fit = s.uncertainty.block_size === undefined ? data : withBlockSize(data, s.uncertainty.block_size, locate(['uncertainty', 'block_size']));
  if (s.uncertainty.source === 'bootstrap' && !fit.blockSites) needPerSite(fit, 'the site bootstrap (uncertainty.source: bootstrap)', locate(['uncertainty', 'source']));
  if (s.uncertainty.source === 'bootstrap' && fit.errorModel) {
    throw new SereError('BAD_SCENARIO', 'the site bootstrap does not model observer error', locate(['uncertainty', 'source']),
      'use source: posterior (the default) with an error matrix');
  }
  const states = fit.states;
  const stateIndex = (name: string, path: KeyPath): number => {
    const i = states.indexOf(name);
    if (i < 0) fail('UNKNOWN_STATE', `unknown state '${name}'`, path, `use one of: ${states.join(', ')}`);
    return i;
  };

  const carried = fit.latest.carried ?? [];
  // Sites not surveyed at the latest time are carried forward (engine/carried-start.ts); the shares
  // reported as the start are theirs under the MLE.
  const unzonedStart = s.start === 'latest'
    ? carried.length === 0
      ? { year: fit.latest.time, shares: Float64Array.from(fit.latest.shares), from: 'latest' as const }
      : { year: fit.latest.time, shares: carriedMix(fit.latest, fitMle(fit).p, fit.states.length, 0, new Float64Array(fit.states.length)),
        from: 'latest' as const, carried }
    : { year: s.start.year, shares: givenShares(s.start.shares, states.length, stateIndex, fail), from: 'given' as const };

  // A zoned fit (pooling partial or none) gives a stratified forecast: each zone from its own start.
  const zones = resolveZones(fit, s.areas, s.start !== 'latest', locate);
  const start = zones ? { year: fit.latest.time, shares: landscapeMix(zones, states.length), from: 'latest' as const } : unzonedStart;
  if (zones && s.plots !== undefined) {
    throw new SereError('BAD_ZONES', 'plot counts are not forecast by zone', locate(['plots']), 'drop plots, or fit with pooling: complete');
  }

  const stepsOf = (years: number, path: KeyPath): number => {
    if (years % fit.step !== 0) {
      fail('BAD_SCENARIO', `${years} years is not a whole number of ${fit.step}-year steps`, path,
        `use a multiple of ${fit.step}`);
    }
    return years / fit.step;
  };
  const horizonSteps = 'steps' in s.horizon ? s.horizon.steps : stepsOf(s.horizon.years, ['horizon', 'years']);
  if (horizonSteps > LIMITS.horizonSteps) {
    fail('BAD_SCENARIO', `a horizon of ${horizonSteps} steps is beyond the limit of ${LIMITS.horizonSteps}`,
      ['horizon', 'steps' in s.horizon ? 'steps' : 'years'], 'forecast a shorter horizon (see Limits in the README)');
  }
  // Survey times may reach ±(2^53 − 1); years past that would be rounded and printed wrong.
  if (!Number.isSafeInteger(start.year + horizonSteps * fit.step)) {
    fail('BAD_SCENARIO', `the horizon ends beyond year ${Number.MAX_SAFE_INTEGER}, the largest sere counts exactly`, ['horizon'],
      'count survey times from a nearer origin, or shorten the horizon');
  }
  const showSteps = s.show
    ? withStart(s.show.map((years, n) => {
      const steps = stepsOf(years, ['show', n]);
      if (steps > horizonSteps) fail('BAD_SCENARIO', `year ${years} is beyond the horizon`, ['show', n], 'extend the horizon or drop it');
      return steps;
    }))
    : defaultShowSteps(fit.step, horizonSteps);

  const ctx: ResolveContext = {
    states, step: fit.step, startYear: start.year, horizonSteps,
    impossible: fitMask(fit),
    stateIndex, locate,
  };
  const variation = options.variation === undefined ? resolveVariation(s.variation, fit, stateIndex, locate)
    : flagVariation(options.variation, fit, file);
  const target = s.target && resolveTarget(s.target, { step: fit.step, horizonSteps, stateIndex, locate });
  const plots = s.plots === undefined ? undefined : startingPlots(s.plots, fit, start, locate(['plots']), locate);
  const baseName = s.name ?? basename(file).replace(/\.ya?ml$/i, '');
  const alternatives = s.alternatives ?? [{ name: baseName, treatments: [], events: [] }];
  const topTreatments = s.treatments.map((value, n) => ({ value, path: ['treatments', n] as KeyPath }));
  const topEvents = s.events.map((value, n) => ({ value, path: ['events', n] as KeyPath }));
  return alternatives.map((alt, a) => {
    const treatmentItems = [...topTreatments, ...alt.treatments.map((value, n) => ({ value, path: ['alternatives', a, 'treatments', n] as KeyPath }))];
    const eventItems = [...topEvents, ...alt.events.map((value, n) => ({ value, path: ['alternatives', a, 'events', n] as KeyPath }))];
    const treatments = resolveTreatments(ctx, treatmentItems).map((t, n) => withZones(t, zones, treatmentItems[n]!, locate));
    checkParcelZones(treatments, treatmentItems.map((item) => item.path), locate);
    const events = resolveEvents(ctx, eventItems).map((e, n) => withZones(e, zones, eventItems[n]!, locate));
    // The MLE alone needs one draw — unless event years or plot counts are random, which need replicates.
    const random = plots !== undefined || events.some((e) => e.scope === 'landscape');
    return {
      name: s.alternatives ? `${baseName}: ${alt.name}` : baseName,
      alternative: s.alternatives ? alt.name : undefined,
      file,
      sha256,
      fit,
      source: s.uncertainty.source,
      variation,
      // Year matrices are random too: the MLE with variation needs replicates like events do.
      draws: s.uncertainty.source === 'point' && !random && variation.kind === 'none' ? 1 : s.uncertainty.draws,
      seed: s.uncertainty.seed ?? fromWorkspace?.seed,
      start,
      horizonSteps,
      showSteps,
      level: s.level,
      target,
      treatments,
      events,
      plots,
      ...(zones ? { zones } : {}),
    };
  });
}

/** A treatment or event with the zones it names as indices (unchanged when it names none). */
function withZones<T extends Treatment | Disturbance>(item: T, zones: ScenarioZones | undefined,
  { value, path }: { value: { zones?: string[] | undefined }; path: KeyPath }, locate: (path: KeyPath) => Place): T {
  const indices = zoneIndices(zones, value.zones, [...path, 'zones'], locate);
  return indices ? { ...item, zones: indices } : item;
}

/** The landscape's start: the zones' starting mixes weighted by their shares of the area. */
function landscapeMix(zones: ScenarioZones, k: number): Float64Array {
  const mix = new Float64Array(k);
  zones.shares.forEach((w, z) => { for (let s = 0; s < k; s++) mix[s] += w * zones.starts[z * k + s]!; });
  return mix;
}

/**
 * The scenario's year-to-year variation. Default: estimated when the record has at least
 * MIN_VARIATION_PERIODS survey periods (fewer cannot show a spread between years), else none. A
 * given concentration is one number for every state, or a map (states not listed do not vary).
 */
/** `--variation none | estimated`, checked as the file's key is, but reported at the flag. */
function flagVariation(kind: 'none' | 'estimated', fit: Fit, file: string): VariationSpec {
  if (kind === 'estimated' && periodCount(fit) < MIN_VARIATION_PERIODS) {
    throw new SereError('BAD_SCENARIO', `--variation estimated needs at least ${MIN_VARIATION_PERIODS} survey periods; the record has ${periodCount(fit)}`,
      { file, path: '--variation' }, 'use --variation none, or give a concentration in the scenario file');
  }
  return { kind };
}

function resolveVariation(given: ScenarioFile['variation'], fit: Fit,
  stateIndex: (name: string, path: KeyPath) => number, locate: (path: KeyPath) => Place): VariationSpec {
  if (given === undefined) return periodCount(fit) >= MIN_VARIATION_PERIODS ? { kind: 'estimated' } : { kind: 'none' };
  if (given === 'none') return { kind: 'none' };
  if (given === 'estimated') {
    if (periodCount(fit) < MIN_VARIATION_PERIODS) {
      throw new SereError('BAD_SCENARIO', `variation: estimated needs at least ${MIN_VARIATION_PERIODS} survey periods; the record has ${periodCount(fit)}`,
        locate(['variation']), 'give a concentration ({ concentration: 50 }) or use variation: none');
    }
    return { kind: 'estimated' };
  }
  const k = fit.states.length;
  const c = given.concentration;
  if (typeof c === 'number') return { kind: 'given', concentration: new Float64Array(k).fill(c) };
  const concentration = new Float64Array(k).fill(Infinity);
  for (const [name, kappa] of Object.entries(c)) concentration[stateIndex(name, ['variation', 'concentration', name])] = kappa;
  return { kind: 'given', concentration };
}

/**
 * Plots at the start: with `plots: latest` and the latest surveyed mix, the actual counts of that
 * survey; otherwise the given number of plots split by the starting shares (largest remainder).
 * With observer error the latest survey's counts are records, not true states: its number of plots
 * is split by the starting (true) mix instead, and each draw re-splits it by its own true start
 * (engine/plot-counts.ts).
 */
function startingPlots(given: NonNullable<ScenarioFile['plots']>, fit: Fit, start: Scenario['start'], place: Place,
  locate: (path: KeyPath) => Place): Scenario['plots'] {
  const { total, start: counts, scale } = plotsAtStart(given, fit, start, place);
  const name = typeof given === 'object' ? given.observer : undefined;
  return { total, start: counts, scale, ...(name !== undefined ? { observer: plotsObserver(name, scale, fit, locate(['plots', 'observer'])) } : {}) };
}

/**
 * The assessed observer whose matrix records the plots: the one who will make the next survey, so
 * its recorded counts can be scored fairly. Matched as the assessment's names are (observerKey).
 */
function plotsObserver(name: string, scale: PlotScale, fit: Fit, place: Place): { name: string; matrix: number } {
  if (scale !== 'recorded') {
    throw new SereError('BAD_SCENARIO', 'plots.observer applies to counts as recorded', place, 'add as: recorded, or drop observer');
  }
  const names = fit.errorModel?.observers?.names;
  if (!names) {
    throw new SereError('BAD_SCENARIO', fit.errorModel ? 'the accuracy assessment names no observers, so there is one error matrix for all'
      : 'plots.observer needs an error table (fit.errors) whose assessment names observers', place,
    fit.errorModel ? 'drop observer (the plots are recorded through the one matrix)' : 'add fit.errors with an observer column, or drop observer');
  }
  const o = names.findIndex((n) => observerKey(n) === observerKey(name));
  if (o < 0) {
    throw new SereError('BAD_SCENARIO', `observer ${quote(name)} is not in the accuracy assessment (it names ${names.map(quote).join(', ')})`, place,
      'name one of them, or drop observer to record through the pooled matrix');
  }
  return { name: names[o]!, matrix: 1 + o };
}

function plotsAtStart(given: NonNullable<ScenarioFile['plots']>, fit: Fit, start: Scenario['start'], place: Place): { total: number; start: readonly number[]; scale: PlotScale } {
  const { count: plots, as: scale } = typeof given === 'object' ? given : { count: given, as: 'true' as const };
  if (plots === 'latest') {
    if (start.from !== 'latest') {
      throw new SereError('BAD_SCENARIO', "plots: latest needs start: latest (the plots of the latest survey)", place,
        'give the number of plots instead');
    }
    if (!fit.errorModel) return { total: fit.latest.sites, start: fit.latest.counts, scale };
    return { total: fit.latest.sites, start: largestRemainder(Array.from(start.shares), fit.latest.sites), scale };
  }
  return { total: plots, start: largestRemainder(Array.from(start.shares), plots), scale };
}

function fitOfData(s: ScenarioFile, file: string,
  fail: (code: 'BAD_SCENARIO', what: string, path: KeyPath, hint: string) => never, locate: (path: KeyPath) => Place,
  rasters?: ReadonlyMap<string, RasterCounts>): Fit {
  if (s.data === undefined) {
    return fail('BAD_SCENARIO', 'data is required: name a fit file (.json), or a survey table or counts table (.csv)', ['data'],
      'add "data: surveys.csv" (relative to this file), or keep the scenario in a workspace folder (sere init), whose surveys it then uses');
  }
  // Relative to the scenario file; shown and recorded relative to the working folder, so output
  // does not carry this machine's absolute paths.
  const dataFile = relative(process.cwd(), resolve(dirname(file), s.data));
  if (dataFile.toLowerCase().endsWith('.json') && s.fit) {
    fail('BAD_SCENARIO', 'fit settings apply only to a survey table, not to a fit file', ['fit'],
      'remove the fit block, or name the survey table (.csv) in data');
  }
  if (dataFile === '' || s.data.trim() === '' || /[\\/]$/.test(s.data)) {
    fail('BAD_SCENARIO', `data names a folder ('${s.data}'), not a file`, ['data'], 'name the survey table (.csv) or fit file (.json) itself');
  }
  try {
    return fitFromFile(dataFile, fitSettingsOf(s.fit, locate, dirname(file)), rasters);
  } catch (err) {
    // The data file itself cannot be read: the place to fix is the scenario's data key.
    if (err instanceof SereError && ['FILE_NOT_FOUND', 'NOT_A_FILE'].includes(err.code) && err.place.file === dataFile) {
      fail('BAD_SCENARIO', `data: ${err.message} (${dataFile})`, ['data'], err.hint);
    }
    // A column the scenario names that the table lacks: the place to fix is that setting.
    if (err instanceof SereError && err.code === 'MISSING_COLUMN' && err.place.file === dataFile) {
      for (const [role, name] of Object.entries(s.fit?.columns ?? {})) {
        if (typeof name === 'string' && err.message.startsWith(missingColumn(normaliseLabel(name), role))) {
          throw new SereError('MISSING_COLUMN', `fit.columns.${role} names ${quote(name)}, and ${dataFile} has ${err.message}`,
            locate(['fit', 'columns', role]), `name one of its columns, or add a ${quote(name)} column to ${dataFile}`);
        }
      }
    }
    throw err;
  }
}

function givenShares(
  shares: Record<string, number>, k: number,
  stateIndex: (name: string, path: KeyPath) => number,
  fail: (code: 'BAD_SHARES', what: string, path: KeyPath, hint: string) => never,
): Float64Array {
  const mix = new Float64Array(k);
  let total = 0;
  for (const [name, share] of Object.entries(shares)) {
    mix[stateIndex(name, ['start', 'shares', name])] = share;
    total += share;
  }
  if (Math.abs(total - 1) > SHARES_SUM_TOLERANCE) {
    fail('BAD_SHARES', `starting shares sum to ${total}, not 1`, ['start', 'shares'],
      'make the shares add up to 1 (states left out count as 0)');
  }
  return mix;
}

/** The start year is always shown; the rest in increasing order, once each. */
function withStart(steps: readonly number[]): number[] {
  return [...new Set([0, ...steps])].sort((a, b) => a - b);
}

/** Start, then the usual 5/10/20/50-year marks that fall on a step, then the horizon itself. */
function defaultShowSteps(step: number, horizonSteps: number): number[] {
  const steps = new Set<number>([0]);
  for (const years of DEFAULT_SHOW_YEARS) {
    if (years % step === 0 && years / step <= horizonSteps) steps.add(years / step);
  }
  steps.add(horizonSteps);
  return [...steps].sort((a, b) => a - b);
}
