import { restrictChain } from '../chain/restrict.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import { StationaryByPattern } from './stationary-by-pattern.js';
import { gathered, stationaryBlock, stationaryOutputs, stationaryTaskCount, type StationaryJob } from './stationary-tasks.js';
import { makePool } from './thread-pool.js';

export interface StationaryDraws {
  /** Stationary mixes of the draws that have a unique one, `[n*k + s]`, n < unique. */
  readonly mixes: Float64Array;
  readonly unique: number;
  /** Draws with two or more closed classes: counted and reported, never averaged in. */
  readonly notUnique: number;
}

/**
 * The stationary mix of every draw. A chain's classes depend only on which entries are positive,
 * and posterior draws nearly all share one pattern, so classes are worked out once per pattern
 * (StationaryByPattern). Zones exchange no land, so with zones the landscape's long-run mix is the
 * area-weighted mixture Σ_z w_z·π_z of the zones' own, in each draw where every zone's is unique.
 * On `threads` threads (the run's: its workers are already started), a block of draws a task.
 */
export function stationaryOfDraws(matrices: MatrixDraws, zoneShares?: ArrayLike<number>, threads = 1): StationaryDraws {
  const { k, count } = matrices;
  const shares = matrices.zones ? Float64Array.from({ length: matrices.zones }, (_, z) => zoneShares![z]!) : undefined;
  return stationaryOnThreads({ kind: 'draws', k, count, data: matrices.data, ...(shares ? { shares } : {}), ...stationaryOutputs(count, k) }, threads);
}

/**
 * Blocks of draws a thread must have before a stationary job is shared: a worker meets this code
 * cold (its first blocks run before V8 has optimised them), so at the zoned demo's four blocks two
 * threads took as long as one (62 against 59 ms, 63 against 56 ms treated), while at 100,000 draws
 * they halved it (267 → 131 ms, 472 → 218 ms treated).
 */
export const STATIONARY_BLOCKS_PER_THREAD = 4;

/**
 * Run a stationary job's blocks of draws on `threads` threads — the run's own count, so its kept
 * workers are the ones used (thread-pool.ts restarts them for another count) — or on this one alone
 * when there are too few blocks for them; then pack the unique mixes.
 */
export function stationaryOnThreads(job: StationaryJob, threads: number): StationaryDraws {
  const tasks = stationaryTaskCount(job);
  if (threads > 1 && tasks >= STATIONARY_BLOCKS_PER_THREAD * threads) {
    const pool = makePool(threads);
    pool.start([]);
    pool.phase({ kind: 'stationary', job });
  } else {
    for (let b = 0; b < tasks; b++) stationaryBlock(job, b);
  }
  return gathered(job);
}

/** The long-run mix of the chain without the states never surveyed as a from-state. */
export interface ObservedRowsStationary {
  /** States never surveyed as a from-state: their rows are the prior alone, and they are left out. */
  readonly dropped: readonly number[];
  /** Over the draws where the restricted chain is defined; mixes are k wide, zero on dropped states. */
  readonly stationary: StationaryDraws;
  /** Draws in which some kept state could only move to dropped states, so the restriction is undefined. */
  readonly undefinedDraws: number;
}

/**
 * A state never surveyed as a from-state still enters the long-run mix, through its row drawn from
 * the prior alone. Beside the full mix we give the mix of the chain restricted to the states seen
 * as from-states (restrictChain: their rows and columns, rows renormalised — the chain conditioned
 * on not entering the unseen states), draw by draw, so a reader sees how much of the long-run mix
 * is the prior's. Null when every state was seen as a from-state (the two would be the same).
 */
export function stationaryOfObservedRows(matrices: MatrixDraws, counts: ArrayLike<number>): ObservedRowsStationary | null {
  // A zoned run's rows differ by zone: the pooled counts cannot say which rows each zone observed.
  if (matrices.zones) return null;
  const { k, count } = matrices;
  const kept: number[] = [];
  const dropped: number[] = [];
  for (let i = 0; i < k; i++) {
    let n = 0;
    for (let j = 0; j < k; j++) n += counts[i * k + j]!;
    (n > 0 ? kept : dropped).push(i);
  }
  if (dropped.length === 0) return null;
  const m = kept.length;
  const stationary = new StationaryByPattern(m);
  const mixes = new Float64Array(count * k);
  let unique = 0; let undefinedDraws = 0;
  for (let d = 0; d < count; d++) {
    const restricted = restrictChain(matrices.data, k, kept, d * k * k);
    if (!restricted) { undefinedDraws += 1; continue; }
    const mix = stationary.mixOf(restricted, 0);
    if (!mix) continue;
    kept.forEach((s, a) => { mixes[unique * k + s] = mix[a]!; });
    unique += 1;
  }
  return {
    dropped,
    stationary: { mixes: mixes.subarray(0, unique * k), unique, notUnique: count - undefinedDraws - unique },
    undefinedDraws,
  };
}
