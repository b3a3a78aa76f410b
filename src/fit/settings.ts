import { SereError, quote, type Place } from '../errors.js';
import { normaliseLabel } from '../data/labels.js';
import type { SurveyColumns, SurveyLayout } from '../data/survey.js';
import { readLabelMap, type LabelMap } from '../data/label-map.js';
import type { ReadSurveyOptions } from '../data/read-survey-csv.js';
import type { PriorSpec } from '../chain/prior.js';
import type { Pooling } from './zones.js';

/** Everything that decides a fit besides the survey table itself. */
export interface FitSettings {
  /** Time units one step spans; with `dates`, years. */
  readonly step: number;
  /**
   * The step was not given (a flag's or scenario's default): a counts table's own step is used
   * then, while a step that was given must match it.
   */
  readonly stepDefaulted?: boolean;
  /** The time column holds ISO dates, rounded to yearly seasons (`--step 1y`, `fit: { step: 1y }`). */
  readonly dates?: boolean;
  readonly prior: PriorSpec;
  readonly states?: readonly string[];
  /** Transitions declared impossible (structural zeros), as [from, to] labels. */
  readonly impossible: readonly (readonly [string, string])[];
  readonly columns: SurveyColumns;
  /** Long or wide; undefined: detected from the header. */
  readonly layout?: SurveyLayout;
  /** The worksheet of a spreadsheet (.xlsx); undefined: its first sheet. */
  readonly sheet?: string;
  /** A label map file (recorded label → state), relative to the working folder. */
  readonly labels?: string;
  /** An error matrix file (an accuracy assessment: recorded,verified,n), relative to the working folder. */
  readonly errors?: string;
  /** Fit only the sites whose group column holds this value. */
  readonly group?: string;
  /**
   * Side of the spatial bootstrap's square blocks, in projected units (pixels on a raster), when
   * sites have positions; undefined: chosen from the range of autocorrelation of the latest states.
   */
  readonly blockSize?: number;
  /** How the zones of the group column share a chain (zones.ts); undefined: complete, one pooled fit. */
  readonly pooling?: Pooling;
  /** Where `states` and `impossible` were given (flags by default, or scenario and workspace keys), for messages. */
  readonly places?: { readonly states?: Place; readonly impossible?: Place; readonly sheet?: Place; readonly labels?: Place;
    readonly columns?: Place; readonly blockSize?: Place; readonly errors?: Place; readonly pooling?: Place };
}

/** How to read the survey table these settings fit: columns, layout, sheet, declared states, the label map (read now). */
export function surveyReadOptions(settings: FitSettings): ReadSurveyOptions {
  const { x, y } = settings.columns;
  if ((x === undefined) !== (y === undefined)) {
    throw new SereError('BAD_OPTION', `a position needs both coordinates: only the ${x === undefined ? 'y' : 'x'} column is named`,
      settings.places?.columns ?? { path: x === undefined ? '--y-column' : '--x-column' }, `name the ${x === undefined ? 'x (easting)' : 'y (northing)'} column too, or neither`);
  }
  if (x === undefined && settings.blockSize !== undefined) {
    throw new SereError('BAD_OPTION', 'a block size needs the sites\' positions', settings.places?.blockSize ?? { path: '--block-size' },
      'name the columns holding them (--x-column and --y-column), or drop the block size');
  }
  return {
    columns: settings.columns,
    states: settings.states,
    statesPlace: settings.places?.states,
    ...(settings.dates ? { dates: true } : {}),
    ...(settings.layout ? { layout: settings.layout } : {}),
    ...(settings.sheet !== undefined ? { sheet: settings.sheet, sheetPlace: settings.places?.sheet ?? { path: '--sheet' } } : {}),
    ...(settings.labels !== undefined ? { labels: labelMapAt(settings.labels, settings.places?.labels ?? { path: '--labels' }) } : {}),
    // With an error matrix a column named `observer` says who made each survey unless another is named.
    ...(settings.errors !== undefined && settings.columns.observer === undefined ? { detectObserver: true } : {}),
  };
}

/** The label map, or why it cannot be read — naming the key or flag that names it when the file is missing. */
export function labelMapAt(file: string, place: Place): LabelMap {
  try {
    return readLabelMap(file);
  } catch (err) {
    if (err instanceof SereError && (err.code === 'FILE_NOT_FOUND' || err.code === 'NOT_A_FILE')) {
      throw new SereError(err.code, err.message, { file, path: place.path }, err.hint);
    }
    throw err;
  }
}

/** Parse `from>to` pairs, e.g. `woodland>open-water`. */
export function parseImpossible(items: readonly string[], place: Place): [string, string][] {
  return items.map((item) => {
    const parts = item.split('>').map((s) => s.trim());
    if (parts.length !== 2 || parts[0] === '' || parts[1] === '') {
      throw new SereError('BAD_OPTION', `${quote(item)} is not a transition written FROM>TO`, place,
        'write each impossible transition as from>to, e.g. woodland>open-water');
    }
    // NFC, as survey labels are, so an accent typed either way names the same state.
    return [normaliseLabel(parts[0]!), normaliseLabel(parts[1]!)];
  });
}

/** A mask of structural zeros in state order; unknown labels are an error naming the option. */
export function impossibleMask(pairs: FitSettings['impossible'], states: readonly string[], place: Place): Uint8Array {
  const k = states.length;
  const mask = new Uint8Array(k * k);
  for (const [from, to] of pairs) {
    const i = states.indexOf(from);
    const j = states.indexOf(to);
    const unknown = i < 0 ? from : j < 0 ? to : undefined;
    if (unknown !== undefined) {
      throw new SereError('UNKNOWN_STATE', `impossible transition ${quote(`${from}>${to}`)} names unknown state ${quote(unknown)}`, place,
        `use one of: ${states.map(quote).join(', ')}`);
    }
    mask[i * k + j] = 1;
  }
  return mask;
}

/**
 * A step as typed: a whole number of time units (`5`), or years of dated surveys (`1y`, `2y`), which
 * makes the time column hold ISO dates. Undefined when it is neither (the caller reports where).
 */
export function parseStep(text: string | number): { step: number; dates: boolean } | undefined {
  const m = /^\s*(\d+)(y?)\s*$/.exec(String(text));
  const n = m ? Number(m[1]) : Number.NaN;
  if (!m || !(n > 0) || !Number.isSafeInteger(n)) return undefined;
  return { step: n, dates: m[2] === 'y' };
}
