import type { Place } from '../errors.js';
import type { CarriedSites } from '../chain/latest-mix.js';
import type { Fit } from '../fit/fit.js';
import type { RowChange } from '../chain/row-change.js';
import type { VariationSpec } from '../uncertainty/variation.js';

/** A scenario with every reference resolved against its fit: what the engine runs. */
export interface Scenario {
  readonly name: string;
  /** In a file listing alternatives, this alternative's own name (shown in comparisons). */
  readonly alternative?: string;
  readonly file: string;
  readonly sha256: string;
  readonly fit: Fit;
  readonly source: 'posterior' | 'bootstrap' | 'point';
  /** Year-to-year variation of the matrix (README, "Year-to-year variation"); `kind: none` is today's chain. */
  readonly variation: VariationSpec;
  readonly draws: number;
  /** Absent when the scenario names none; the CLI then picks one and prints it. */
  readonly seed?: number;
  /**
   * `shares` is the start for every draw, unless `carried` lists sites not surveyed at the latest
   * time: then each draw starts from the surveyed sites plus those carried forward through its own
   * matrix (engine/carried-start.ts), and `shares` is that start under the MLE, for reports.
   */
  readonly start: { readonly year: number; readonly shares: Float64Array; readonly from: 'latest' | 'given'; readonly carried?: readonly CarriedSites[] };
  readonly horizonSteps: number;
  /** Steps after the start shown in the terminal table. */
  readonly showSteps: readonly number[];
  readonly level: number;
  readonly target?: LandscapeTarget;
  /** Management, in the order it composes within a year (file order). */
  readonly treatments: readonly Treatment[];
  /** Disturbances, in the order they strike within a year (file order). */
  readonly events: readonly Disturbance[];
  /**
   * Forecast plot counts too: how many plots, how many start in each state, and on which scale —
   * the true states, or as recorded (through each draw's error matrix; the same as true without one).
   */
  readonly plots?: {
    readonly total: number; readonly start: readonly number[]; readonly scale?: PlotScale;
    /** As recorded by one assessed observer: their name and their matrix (1 + o in `MatrixDraws.observerEmissions`). */
    readonly observer?: { readonly name: string; readonly matrix: number };
  };
  /** A stratified forecast (the fit keeps zones): each zone's share of the area and its start. */
  readonly zones?: ScenarioZones;
}

/**
 * The zones of a stratified forecast, in the fit's zone order. Each zone runs on its own matrix
 * draws from its own latest surveyed mix; the landscape is their sum weighted by `shares`.
 */
export interface ScenarioZones {
  readonly names: readonly string[];
  /** Each zone's share of the whole area, adding up to 1. */
  readonly shares: Float64Array;
  /** Where the shares came from: areas with a unit, shares as written, or each zone's share of the plots (the default). */
  readonly from: 'areas' | 'shares' | 'plots';
  /** The unit of `areas`, when given so (ha, km2, …), and each zone's area in it. */
  readonly unit?: string;
  readonly areas?: Float64Array;
  /** `starts[z*k + s]`: zone z's starting mix (its latest surveyed mix). */
  readonly starts: Float64Array;
  /** Per zone, its sites not surveyed at the latest time, carried forward through each draw's zone matrix. */
  readonly carried: readonly (readonly CarriedSites[] | undefined)[];
}

/**
 * A landscape-level goal on the summed share of a set of states: at least a threshold (a share to
 * reach) or at most one (a cap). It is met in a year when the summed share of the whole area is on
 * the right side of the threshold (engine/target.ts), and counts as reached in the first year from
 * which it then holds `staysMet` consecutive steps within the horizon.
 */
export interface LandscapeTarget {
  /** State indices, distinct, in the order the file lists them. */
  readonly states: readonly number[];
  readonly bound: 'at-least' | 'at-most';
  readonly threshold: number;
  /** Consecutive steps it must hold (1: the year it is first met). */
  readonly staysMet: number;
}

export interface Treatment {
  readonly name: string;
  /** The from-state whose row it changes. */
  readonly row: number;
  readonly change: RowChange;
  /** Strength for each step 0 … horizon (0 = not acting, 1 = full), ramp included. */
  readonly weights: Float64Array;
  /** Share of the whole area treated. */
  readonly area: number;
  /** Treatments with the same parcel act on the same land. */
  readonly parcel: string;
  /** The zones it acts in (indices into scenario.zones), `area` being a share of them; absent: everywhere. */
  readonly zones?: readonly number[];
  /** Where it is written, for errors found when it meets the fitted matrix. */
  readonly place: Place;
}

export interface Disturbance {
  readonly name: string;
  /** landscape: the whole area is hit in the same year; site: each site independently. */
  readonly scope: 'landscape' | 'site';
  /** Chance of a hit during each step 0 … horizon (0 outside the event's years). */
  readonly chances: Float64Array;
  /** k×k row-major: where a hit site goes; rows not given in the file are identity rows. */
  readonly matrix: Float64Array;
  /** The zones it strikes (indices into scenario.zones); absent: everywhere. */
  readonly zones?: readonly number[];
}

/** Which states plot counts describe: the true ones, or those a survey would record (README, observer error). */
export type PlotScale = 'true' | 'recorded';
