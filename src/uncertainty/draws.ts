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
}
