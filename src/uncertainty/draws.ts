import type { RowVariation } from './variation.js';

/**
 * D transition matrices, one per draw, in one flat array: matrix d starts at `d*k*k` and is
 * row-major (row = from). Every sampler returns this shape, so the engine does not care where the
 * uncertainty came from.
 */
export interface MatrixDraws {
  readonly k: number;
  readonly count: number;
  readonly data: Float64Array;
  /** How the draws were made, for the report. */
  readonly source: 'posterior' | 'bootstrap' | 'point';
  /** Notes the user should hear (rows that fell back to the prior, …). */
  readonly notes: readonly string[];
  /**
   * Year-to-year variation: `concentration[d*k + i]`, κ of row i's year-to-year spread in draw d
   * (Infinity: the row does not vary). Absent: no variation, today's chain.
   */
  readonly concentration?: Float64Array;
  /**
   * With observer error: each draw's starting mix (D × k), the true mix at the latest survey time
   * from the same sampler sweep as its matrix (engine/carried-start.ts uses it in place of the
   * recorded mix). Absent otherwise.
   */
  readonly starts?: Float64Array;
  /**
   * With observer error: each draw's error matrix E (D × k × k, row = true state, column =
   * recorded), from the same sampler sweep as its matrix and start; plot counts "as recorded" are
   * drawn through it (engine/plot-counts.ts). Absent otherwise.
   */
  readonly emissions?: Float64Array;
  /**
   * With one error matrix per observer (fit/error-model.ts): each draw's every matrix, D × M × k × k
   * — matrix 0 the pooled one (as `emissions`), matrix 1 + o observer o of `observers` — all from
   * the same sampler sweep as the draw's P. Scores on the recorded scale read each survey through
   * its own observer's matrix (evaluation/recorded-predictive.ts). Absent otherwise.
   */
  readonly observerEmissions?: Float64Array;
  /** The assessed observers of `observerEmissions`, in order: observer o is matrix 1 + o. */
  readonly observers?: readonly string[];
  /** How each row's variation was set (variation.ts), when there is any. */
  readonly variation?: readonly RowVariation[];
  /**
   * Zones fitted each on their own (pooling: none): each zone's own `variation` (its κ estimated
   * from its own record), and then `variation` is absent — no one κ speaks for the landscape.
   */
  readonly zoneVariation?: readonly (readonly RowVariation[] | undefined)[];
  /**
   * Stratified by zone (zone-draws.ts): `data` holds this many sets of `count` matrices, zone z's
   * draw d at `(z*count + d)*k*k`, and `concentration` likewise at `(z*count + d)*k`. Absent: one
   * landscape. Draw d of every zone comes from the same posterior draw of the shared (κ, p).
   */
  readonly zones?: number;
}
