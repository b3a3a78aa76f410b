import { SereError, quote, type Place } from '../errors.js';
import type { SurveyTable } from '../data/survey.js';
import { partialPoolingMle, type PartialPooling } from '../chain/zone-pooling.js';
import { fitMask, fitMle, fitSurvey, type Fit } from './fit.js';
import type { FitSettings } from './settings.js';
import { groupsWithRows, selectRows } from '../data/survey-rows.js';
import type { ZoneSamplerRun } from './zone-sampler.js';

/**
 * How zones (the values of the group column: soil types, management units) share a chain.
 * complete: one pooled fit (the default; zones play no part). none: each zone its own fit, as
 * `sere fit --by` makes them. partial: each zone its own matrix, its rows shrunk toward shared
 * rows by how alike the zones are (chain/zone-pooling.ts).
 */
export type Pooling = 'complete' | 'partial' | 'none';
export const POOLINGS: readonly Pooling[] = ['complete', 'partial', 'none'];

export interface Zone {
  readonly name: string;
  /** The zone's own fit: its sites' surveys, with the whole table's states. */
  readonly fit: Fit;
}

/** The zones of a fit that keeps them (`pooling: partial | none`); the fit itself stays the pooled one. */
export interface FitZones {
  readonly column: string;
  readonly pooling: 'partial' | 'none';
  readonly zones: readonly Zone[];
  /**
   * Partial pooling, after `sere fit` ran its posterior sampler once with the fit's seed: the
   * sampler's convergence diagnostics (zone-sampler.ts). Not read back from a fit file: a report.
   */
  readonly sampler?: ZoneSamplerRun;
}

/**
 * A zoned fit of a survey table: the pooled fit of every row (what every command that knows no
 * zones keeps using) carrying one fit per zone. `place` names the pooling setting for errors.
 */
export function fitZoned(table: SurveyTable, settings: FitSettings, pooling: 'partial' | 'none', place: Place): Fit {
  const column = settings.columns.group;
  if (column === undefined) {
    throw new SereError('BAD_ZONES', `pooling: ${pooling} needs a zone column`, place,
      'name the column holding each site\'s zone: --group-column NAME, or fit.columns.group in a scenario');
  }
  const names = groupsWithRows(table);
  if (pooling === 'partial' && names.length < 2) {
    throw new SereError('BAD_ZONES', `pooling: partial needs at least two zones; column ${quote(column)} holds ${names.length === 0 ? 'none' : `only ${quote(names[0]!)}`}`,
      place, 'use pooling: complete (one fit), or a column with two or more zones');
  }
  const whole = fitSurvey(table, settings);
  const zones = names.map((name) => {
    const g = table.groups!.indexOf(name);
    const rows = selectRows(table, (n) => table.rows.group![n] === g)!;
    try {
      return { name, fit: fitSurvey(rows, settings) };
    } catch (err) {
      if (err instanceof SereError && err.code === 'NO_TRANSITIONS') {
        throw new SereError('BAD_ZONES', `zone ${quote(name)} has no two surveys of one site a step apart: its chain cannot be fitted`,
          { file: table.file, path: column }, 'survey its sites again, or merge it into another zone in the zone column');
      }
      throw err;
    }
  });
  return { ...whole, zones: { column, pooling, zones } };
}

/**
 * The partial-pooling point estimate of a zoned fit, made once per fit. Each zone hands over its
 * completed counts at its own maximum-likelihood matrix — its one-step counts plus the expected
 * one-step transitions inside its bridges (the E-step of gap-em.ts at the converged EM fit) — so a
 * zone's `own_probabilities` are exactly the proportions the pooled model starts from; without gaps
 * these are its one-step counts. A plug-in (one E-step at each zone's own fit, not a joint
 * maximisation over the pooled model), stated as such in the README; the posterior draws join the
 * gaps properly (uncertainty/zone-augment.ts).
 */
const pooled = new WeakMap<Fit, PartialPooling>();
export function zonePooling(fit: Fit): PartialPooling {
  let p = pooled.get(fit);
  if (!p) {
    const zones = fit.zones!.zones;
    p = partialPoolingMle(zones.map((z) => completedCounts(fitMle(z.fit).expected)), fitMask(fit), fit.states.length, fitMle(fit).p);
    pooled.set(fit, p);
  }
  return p;
}

/**
 * Below this an expected count is EM still creeping toward a zero on the boundary (it converges
 * slowly there: 10⁻³⁰ of a transition is common), taken as zero: the concentration's fixed point
 * cannot tell such a cell from an empty one, and ψ(a + n) − ψ(a) for n near 10⁻³⁰ is rounding alone.
 */
export const EXPECTED_COUNT_FLOOR = 1e-6;

function completedCounts(expected: Float64Array): Float64Array {
  return Float64Array.from(expected, (n) => (n < EXPECTED_COUNT_FLOOR ? 0 : n));
}
