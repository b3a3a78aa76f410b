import { patternLength, type RecordPatterns } from '../chain/record-patterns.js';
import type { Multinomial } from './multinomial.js';
import { lastPositive } from './categorical.js';
import { sampleOnePath } from './one-path.js';
import type { SweepTables } from './sweep-tables.js';

/** Where one sweep of the error-model sampler adds what it drew. */
export interface CompletedRecords {
  /** k × k one-step transitions of the true paths, first survey to the latest survey time. */
  readonly transitions: Float64Array;
  /** k × k per error matrix (M of them, one after another), row = true, column = recorded: each survey's true state against what was recorded, added to the matrix it was recorded through. */
  readonly recorded: Float64Array;
  /** k: the true state at each site's first survey. */
  readonly first: Float64Array;
  /** k: the true state at the latest survey time (sites carried there as the forecast does). */
  readonly latest: Float64Array;
}

/** Scratch space made once per chain: the inner loops allocate nothing. */
export interface PathScratch {
  /** T × k filtered laws (forwardFilter), grown to the longest pattern. */
  filter: Float64Array;
  /** T × k: row t holds the states where filter row t is positive, ascending; `support` counts them. */
  support: Int32Array;
  supportCount: Int32Array;
  readonly here: Int32Array;
  readonly next: Int32Array;
  readonly drawn: Int32Array;
  readonly carried: Int32Array;
  readonly q: Float64Array;
}

export function pathScratch(k: number): PathScratch {
  return { filter: new Float64Array(0), support: new Int32Array(0), supportCount: new Int32Array(0), here: new Int32Array(k), next: new Int32Array(k), drawn: new Int32Array(k), carried: new Int32Array(k), q: new Float64Array(k) };
}

/**
 * Draw the true paths of every site of one record pattern given (π, P, E) — E the error
 * matrices one after another, each survey emitting through its own (record-patterns.ts) — and add their
 * transitions, true-against-recorded counts, first and latest true states into `out`.
 *
 * Forward filtering, backward sampling (Carter & Kohn 1994; Frühwirth-Schnatter 1994): the
 * filtered law α̂_t(x) = P(X_t = x | records up to t) is computed once for the pattern (scaled, as
 * in forward-backward.ts), then the paths are drawn from the last survey back:
 * X_T ~ α̂_T, and X_t | X_{t+1} = b ~ α̂_t(a)·P[a, b] normalised. The n sites of a pattern share
 * every filtered law, and their paths are independent given the parameters, so they are drawn
 * together (as bridge-sampler.ts draws a gap cell's bridges): at each step the m_b paths in state b
 * choose their previous state as one Multinomial(m_b, ·) — O(T·k²) per pattern however many sites
 * share it.
 *
 * From the last survey the site is carried to the latest survey time through P (no records there),
 * one Multinomial per state and step, so the latest true mix includes sites not surveyed then.
 * A pattern of one site (almost all of them at the `observer` bench's size) is drawn as one state
 * carried back (one-path.ts) with the same uniforms: `multinomial` and `uniform` must come from
 * the same stream.
 */
export function samplePatternPaths(records: RecordPatterns, q: number, pi: Float64Array, tables: SweepTables,
  multinomial: Multinomial, uniform: () => number, scratch: PathScratch, out: CompletedRecords): void {
  const T = patternLength(records, q);
  const k = tables.k;
  if (scratch.filter.length < T * k) {
    scratch.filter = new Float64Array(2 * T * k);
    scratch.support = new Int32Array(2 * T * k);
    scratch.supportCount = new Int32Array(2 * T);
  }
  forwardFilter(records, q, T, pi, tables, scratch);
  if (records.sites[q] === 1) sampleOnePath(records, q, T, tables, uniform, scratch, out);
  else samplePathsTogether(records, q, T, tables.p, k, multinomial, scratch, out);
}

/**
 * The backward sampling of samplePatternPaths for all n sites of pattern q at once, given its
 * filtered laws in `scratch.filter`: k counts carried from step to step, one Multinomial per
 * occupied state and step. For n = 1 its draws are sampleOnePath's (test/uncertainty/one-path.test.ts).
 */
export function samplePathsTogether(records: RecordPatterns, q: number, T: number, p: Float64Array, k: number,
  multinomial: Multinomial, scratch: PathScratch, out: CompletedRecords): void {
  const n = records.sites[q]!;
  const { filter, here, next, drawn, q: weights } = scratch;
  const first = records.start[q]!;
  const end = records.start[q + 1]!;
  // Backward sampling, from the last survey (t = T − 1, always surveyed) to the first.
  here.fill(0);
  multinomial(n, filter, (T - 1) * k, lastPositive(filter, (T - 1) * k, k) + 1, here, 0);
  carryToLatest(records.extend[q]!, p, k, multinomial, scratch, out);
  let s = end - 1;
  for (let t = T - 1; ; t--) {
    if (s >= first && records.at[s] === t) {
      const r = records.matrix[s]! * k * k + records.state[s]!;
      for (let x = 0; x < k; x++) out.recorded[r + x * k] += here[x]!;
      s -= 1;
    }
    if (t === 0) break;
    next.fill(0);
    for (let b = 0; b < k; b++) {
      const m = here[b]!;
      if (m === 0) continue;
      let total = 0;
      for (let a = 0; a < k; a++) total += weights[a] = filter[(t - 1) * k + a]! * p[a * k + b]!;
      for (let a = 0; a < k; a++) weights[a] = weights[a]! / total;
      drawn.fill(0);
      multinomial(m, weights, 0, lastPositive(weights, 0, k) + 1, drawn, 0);
      for (let a = 0; a < k; a++) {
        out.transitions[a * k + b] += drawn[a]!;
        next[a] += drawn[a]!;
      }
    }
    here.set(next);
  }
  for (let x = 0; x < k; x++) out.first[x] += here[x]!;
}

/**
 * The sites in `scratch.here` carried `steps` steps through P (none when −1: not carried), their
 * state at the latest time added into `out.latest` and their transitions on the way into
 * `out.transitions`: those steps are part of the latent path, so P is drawn given them too —
 * without them P and the latest true mix of a sweep would be drawn as if independent given the
 * surveyed part of the paths, and forecast bands were too narrow (coverage 85% for 90% bands in
 * test/slow/error-sbc.test.ts).
 */
function carryToLatest(steps: number, p: Float64Array, k: number, multinomial: Multinomial, scratch: PathScratch, out: CompletedRecords): void {
  if (steps < 0) return;
  const now = scratch.carried;
  const step = scratch.drawn;
  now.set(scratch.here);
  for (let t = 0; t < steps; t++) {
    const after = scratch.next;
    after.fill(0);
    for (let a = 0; a < k; a++) {
      if (now[a] === 0) continue;
      step.fill(0);
      multinomial(now[a]!, p, a * k, lastPositive(p, a * k, k) + 1, step, 0);
      for (let b = 0; b < k; b++) {
        out.transitions[a * k + b] += step[b]!;
        after[b] += step[b]!;
      }
    }
    now.set(after);
  }
  for (let x = 0; x < k; x++) out.latest[x] += now[x]!;
}

/**
 * The filtered laws α̂_t ∝ (α̂_{t−1} P) ⊙ e_t of pattern q into `scratch.filter` (T × k), e_t =
 * E[·, recorded] at a survey, ones elsewhere; each row scaled to sum 1; and the states where each
 * row is positive into `scratch.support`. Only those states of α̂_{t−1} enter the sum over a, and
 * only the x with e_t(x) ≠ 0 (a structural zero of E: `tables.emitSupport`) are summed at a
 * survey; the other entries are 0. A skipped term is a product with a 0 factor (P and E finite,
 * nonnegative), and adding +0 leaves a nonnegative sum as it was, so the values are those of the
 * full product over every a and x in the same order, bit for bit (test/uncertainty/one-path.test.ts).
 * After a survey through an error matrix with few confusions α̂ has few positive states, so most
 * steps cost a few multiply-adds instead of k².
 */
export function forwardFilter(records: RecordPatterns, q: number, T: number, pi: Float64Array, tables: SweepTables,
  scratch: PathScratch): void {
  const { k, pT, emit, emitSupport, emitCount } = tables;
  const { filter, support, supportCount } = scratch;
  const end = records.start[q + 1]!;
  let s = records.start[q]!;
  for (let t = 0; t < T; t++) {
    const row = t * k;
    const before = row - k;
    const surveyed = s < end && records.at[s] === t;
    // Column (matrix, recorded state) of the emission tables (record-patterns.ts).
    const column = surveyed ? records.matrix[s]! * k + records.state[s]! : 0;
    const base = column * k;
    const n = surveyed ? emitCount[column]! : k;
    const previous = t === 0 ? 0 : supportCount[t - 1]!;
    for (let x = 0; x < k; x++) filter[row + x] = 0;
    let total = 0;
    for (let i = 0; i < n; i++) {
      const x = surveyed ? emitSupport[base + i]! : i;
      let v = 0;
      if (t === 0) v = pi[x]!;
      else {
        const c = x * k;
        for (let j = 0; j < previous; j++) {
          const a = support[before + j]!;
          v += filter[before + a]! * pT[c + a]!;
        }
      }
      if (surveyed) v *= emit[base + x]!;
      filter[row + x] = v;
      total += v;
    }
    if (!(total > 0)) throw new Error('a record pattern has probability 0 under the sampler\'s parameters (checked at fit time)');
    let positive = 0;
    for (let i = 0; i < n; i++) {
      const x = surveyed ? emitSupport[base + i]! : i;
      const v = filter[row + x]! / total;
      filter[row + x] = v;
      if (v > 0) support[row + positive++] = x;
    }
    supportCount[t] = positive;
    if (surveyed) s += 1;
  }
}
