import type { SurveyRows } from '../data/survey.js';

/**
 * Every site's record as the hidden-state fit with observer error sees it, sites with the identical
 * record pooled into one pattern: the recorded states at their steps after the site's first survey,
 * and how many steps after its last survey the latest survey time falls (−1 when that is not a
 * whole number of steps: the site is then not carried to the latest time, as in latest-mix.ts).
 * Sites with one record are one sufficient statistic: the likelihood, its EM step and the
 * forward filter are the same for all of them, so each is done once per pattern (and the paths of
 * a pattern's n sites are drawn together, uncertainty/error-sampler.ts).
 *
 * Flat arrays: pattern q holds surveys `start[q] … start[q+1]−1`; a survey has its step after the
 * pattern's first survey (`at`, 0 for the first), its recorded state, the error matrix it was
 * recorded through (`matrix`: 0 with one shared matrix; with one matrix per observer, the matrix
 * of the observer who made it — so two sites are one pattern only when the same observers
 * recorded the same states at the same steps) and the line of that survey for the first site with
 * this record (for messages).
 */
export interface RecordPatterns {
  readonly count: number;
  /** Sites with each record. */
  readonly sites: Float64Array;
  readonly start: Int32Array;
  readonly at: Int32Array;
  readonly state: Uint8Array;
  /** Index of the error matrix each survey was recorded through (fit/error-model.ts: 0 is the pooled or only one). */
  readonly matrix: Uint16Array;
  readonly line: Float64Array;
  /** Steps from the last survey to the latest survey time; −1: not a whole number of steps (not carried). */
  readonly extend: Int32Array;
}

/**
 * Group the rows (ordered by site, then time, survey.ts) into record patterns. Every gap is
 * assumed to be whole steps — checked before (chain/counts.ts: GAP_NOT_WHOLE_STEPS).
 * `matrixOfObserver[o]`: the error matrix of observer o (`rows.observer`); absent, every survey
 * is read through matrix 0.
 */
export function recordPatterns(rows: SurveyRows, step: number, matrixOfObserver?: ArrayLike<number>): RecordPatterns {
  let latest = -Infinity;
  for (let n = 0; n < rows.count; n++) latest = Math.max(latest, rows.time[n]!);
  const index = new Map<string, number>();
  const sites: number[] = [];
  const start: number[] = [0];
  const at: number[] = [];
  const state: number[] = [];
  const matrix: number[] = [];
  const line: number[] = [];
  const matrixOf = (n: number): number => (matrixOfObserver && rows.observer ? matrixOfObserver[rows.observer[n]!]! : 0);
  const extend: number[] = [];
  for (let first = 0; first < rows.count;) {
    let last = first;
    while (last + 1 < rows.count && rows.site[last + 1] === rows.site[first]) last += 1;
    const gap = latest - rows.time[last]!;
    const ext = gap % step === 0 ? gap / step : -1;
    let key = `${ext}`;
    for (let n = first; n <= last; n++) key += `,${(rows.time[n]! - rows.time[first]!) / step}:${rows.state[n]}:${matrixOf(n)}`;
    const known = index.get(key);
    if (known !== undefined) sites[known] += 1;
    else {
      index.set(key, sites.length);
      sites.push(1);
      extend.push(ext);
      for (let n = first; n <= last; n++) {
        at.push((rows.time[n]! - rows.time[first]!) / step);
        state.push(rows.state[n]!);
        matrix.push(matrixOf(n));
        line.push(rows.line[n]!);
      }
      start.push(at.length);
    }
    first = last + 1;
  }
  return {
    count: sites.length, sites: Float64Array.from(sites), start: Int32Array.from(start), at: Int32Array.from(at),
    state: Uint8Array.from(state), matrix: Uint16Array.from(matrix), line: Float64Array.from(line), extend: Int32Array.from(extend),
  };
}

/** Steps from a pattern's first survey to its last, plus one: the length of its hidden path. */
export function patternLength(r: RecordPatterns, q: number): number {
  return r.at[r.start[q + 1]! - 1]! + 1;
}

/**
 * The per-step emission likelihoods of pattern q (T × k, T = patternLength): at a surveyed step
 * with recorded state r through matrix m, e(x) = E_m[x, r] (row = true state, column = recorded;
 * `emission` holds the matrices one after another, k × k each); all ones where the site was not
 * surveyed. Written into `out` (at least T × k long).
 */
export function patternEmissions(r: RecordPatterns, q: number, emission: ArrayLike<number>, k: number, out: Float64Array): Float64Array {
  const T = patternLength(r, q);
  out.fill(1, 0, T * k);
  for (let s = r.start[q]!; s < r.start[q + 1]!; s++) {
    const t = r.at[s]!;
    const at = r.matrix[s]! * k * k + r.state[s]!;
    for (let x = 0; x < k; x++) out[t * k + x] = emission[at + x * k]!;
  }
  return out;
}
