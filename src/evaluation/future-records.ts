import type { RecordPatterns } from '../chain/record-patterns.js';
import type { RandomStream } from '../uncertainty/random.js';
import type { ErrorTruth } from './error-truth.js';

/** The records after simulated future surveys, and their recorded one-step pairs (k × k) to add to the recorded counts. */
export interface FutureRecords {
  readonly records: RecordPatterns;
  readonly recordedPairs: Float64Array;
}

/**
 * The records as they would stand after `seasons` more seasons of surveys of the chosen sites
 * (resurvey-choice.ts `resurveyedSites`), simulated from one replicate's truth (error-truth.ts):
 * each chosen site starts from a true state at the latest survey time — one of its pattern's
 * sites' true states in the truth, without replacement — makes `seasons` true transitions under
 * the truth's P, and each is recorded through the truth's E: the matrix of the site's latest survey
 * (the same observer returns; with one shared matrix, that one). A new plot starts from the truth's
 * true latest mix, is first surveyed a step after the latest time, and is recorded through the
 * pooled matrix (an observer the assessment did not see). The surveys are appended to the site's
 * record as new times; sites with the same extended record are pooled into one pattern, as
 * record-patterns.ts does.
 *
 * No site is carried to a latest time (every `extend` is −1): the steps after a site's last survey
 * have no record, so the sampler's P is drawn from the same posterior with or without them; the
 * forecast's start is taken from the current posterior (survey-effort-errors.ts). With no site
 * chosen the records are the fit's, patterns in the same order, so "now" is this with no surveys.
 */
export function futureRecords(records: RecordPatterns, truth: ErrorTruth, k: number, chosen: { patterns: readonly number[]; newPlots: number },
  seasons: number, random: RandomStream): FutureRecords {
  const kk = k * k;
  const taken = new Float64Array(records.count);
  for (const q of chosen.patterns) taken[q] += 1;
  const left = Float64Array.from(truth.latestByPattern);
  const groups = new Map<string, { from: number; recorded: number[]; sites: number }>();
  const recordedPairs = new Float64Array(kk);
  const survey = (from: number, x: number, matrix: number, previous: number): void => {
    const recorded: number[] = [];
    let state = x;
    let before = previous;
    for (let y = 0; y < seasons; y++) {
      state = pick(truth.p, state * k, k, random.uniform());
      const r = pick(truth.e, matrix * kk + state * k, k, random.uniform());
      if (before >= 0) recordedPairs[before * k + r] += 1;
      recorded.push(r);
      before = r;
    }
    const key = `${from}:${recorded.join(',')}`;
    const group = groups.get(key);
    if (group) group.sites += 1;
    else groups.set(key, { from, recorded, sites: 1 });
  };
  for (const q of chosen.patterns) {
    // A true latest state of one of pattern q's sites not yet taken: uniform over them.
    let remaining = 0;
    for (let x = 0; x < k; x++) remaining += left[q * k + x]!;
    let u = random.integer(remaining);
    let x = 0;
    while (u >= left[q * k + x]!) u -= left[q * k + x++]!;
    left[q * k + x] -= 1;
    const last = records.start[q + 1]! - 1;
    survey(q, x, records.matrix[last]!, seasons > 0 ? records.state[last]! : -1);
  }
  for (let n = 0; n < chosen.newPlots; n++) survey(-1, pick(truth.latestShares, 0, k, random.uniform()), 0, -1);
  return { records: buildPatterns(records, taken, groups, seasons), recordedPairs };
}

/** The fit's records as the effort's sampler reads them: the same patterns, none carried to the latest time ("now"). */
export function currentRecords(records: RecordPatterns): RecordPatterns {
  return buildPatterns(records, new Float64Array(records.count), new Map(), 0);
}

/** The state whose cumulative chance first passes u, in row `at` of `chances` (k entries). */
function pick(chances: Float64Array, at: number, k: number, u: number): number {
  let next = 0;
  while (next < k - 1 && (u -= chances[at + next]!) >= 0) next += 1;
  return next;
}

function buildPatterns(records: RecordPatterns, taken: Float64Array, groups: Map<string, { from: number; recorded: number[]; sites: number }>,
  seasons: number): RecordPatterns {
  const sites: number[] = [];
  const start: number[] = [0];
  const at: number[] = [];
  const state: number[] = [];
  const matrix: number[] = [];
  const line: number[] = [];
  const copy = (q: number): number => {
    for (let s = records.start[q]!; s < records.start[q + 1]!; s++) {
      at.push(records.at[s]!);
      state.push(records.state[s]!);
      matrix.push(records.matrix[s]!);
      line.push(records.line[s]!);
    }
    return records.at[records.start[q + 1]! - 1]!;
  };
  for (let q = 0; q < records.count; q++) {
    const n = records.sites[q]! - taken[q]!;
    if (n <= 0) continue;
    sites.push(n);
    copy(q);
    start.push(at.length);
  }
  for (const { from, recorded, sites: n } of groups.values()) {
    sites.push(n);
    // A resurveyed site's new surveys follow its latest one a step apart; a new plot's first is its step 0.
    const lastAt = from >= 0 ? copy(from) : -1;
    const through = from >= 0 ? records.matrix[records.start[from + 1]! - 1]! : 0;
    for (let y = 0; y < seasons; y++) {
      at.push(lastAt + 1 + y);
      state.push(recorded[y]!);
      matrix.push(through);
      line.push(0);
    }
    start.push(at.length);
  }
  return {
    count: sites.length, sites: Float64Array.from(sites), start: Int32Array.from(start), at: Int32Array.from(at),
    state: Uint8Array.from(state), matrix: Uint16Array.from(matrix), line: Float64Array.from(line),
    extend: new Int32Array(sites.length).fill(-1),
  };
}
