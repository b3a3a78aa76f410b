import { communicatingClasses, type ChainClasses } from '../chain/classes.js';
import { restrictChain } from '../chain/restrict.js';
import { stationaryGivenClasses } from '../chain/stationary.js';
import type { MatrixDraws } from '../uncertainty/draws.js';

export interface StationaryDraws {
  /** Stationary mixes of the draws that have a unique one, `[n*k + s]`, n < unique. */
  readonly mixes: Float64Array;
  readonly unique: number;
  /** Draws with two or more closed classes: counted and reported, never averaged in. */
  readonly notUnique: number;
}

/**
 * The stationary mix of every draw. A chain's classes depend only on which entries are positive,
 * and posterior draws nearly all share one pattern, so classes are worked out once per pattern.
 */
export function stationaryOfDraws(matrices: MatrixDraws, zoneShares?: ArrayLike<number>): StationaryDraws {
  if (matrices.zones) return zonedStationary(matrices, zoneShares!);
  const { k, count } = matrices;
  const mixOf = stationaryByPattern(k);
  const mixes = new Float64Array(count * k);
  let unique = 0;
  for (let d = 0; d < count; d++) {
    const mix = mixOf(matrices.data, d * k * k);
    if (!mix) continue;
    mixes.set(mix, unique * k);
    unique += 1;
  }
  return { mixes: mixes.subarray(0, unique * k), unique, notUnique: count - unique };
}

/**
 * Zones exchange no land, so the landscape's long-run mix is the area-weighted mixture of the
 * zones' own: Σ_z w_z·π_z in each draw where every zone's mix is unique.
 */
function zonedStationary(matrices: MatrixDraws, shares: ArrayLike<number>): StationaryDraws {
  const { k, count } = matrices;
  const mixOf = stationaryByPattern(k);
  const mixes = new Float64Array(count * k);
  let unique = 0;
  for (let d = 0; d < count; d++) {
    let ok = true;
    for (let z = 0; z < matrices.zones! && ok; z++) {
      const mix = mixOf(matrices.data, (z * count + d) * k * k);
      if (!mix) { ok = false; break; }
      for (let s = 0; s < k; s++) mixes[unique * k + s] = (z === 0 ? 0 : mixes[unique * k + s]!) + shares[z]! * mix[s]!;
    }
    if (ok) unique += 1;
  }
  return { mixes: mixes.subarray(0, unique * k), unique, notUnique: count - unique };
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
  const mixOf = stationaryByPattern(m);
  const mixes = new Float64Array(count * k);
  let unique = 0; let undefinedDraws = 0;
  for (let d = 0; d < count; d++) {
    const restricted = restrictChain(matrices.data, k, kept, d * k * k);
    if (!restricted) { undefinedDraws += 1; continue; }
    const mix = mixOf(restricted, 0);
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

/**
 * Stationary mix of a k×k matrix at `offset`, or null when not unique; classes cached by sparsity
 * pattern. Consecutive draws nearly always share a pattern, so it is first compared with the last
 * one's, byte by byte: building the pattern's string key for every draw (k² concatenations and a
 * hash) cost more than the stationary mix itself (measured on 100,000 draws of 10 states).
 */
export function stationaryByPattern(k: number): (p: Float64Array, offset: number) => Float64Array | null {
  const k2 = k * k;
  const classesByPattern = new Map<string, ChainClasses>();
  const pattern = new Uint8Array(k2);
  const last = new Uint8Array(k2);
  let lastClasses: ChainClasses | undefined;
  return (p, offset) => {
    let same = lastClasses !== undefined;
    for (let c = 0; c < k2; c++) {
      const bit = p[offset + c]! > 0 ? 1 : 0;
      pattern[c] = bit;
      if (bit !== last[c]) same = false;
    }
    if (!same) {
      const key = String.fromCharCode(...pattern);
      let found = classesByPattern.get(key);
      if (!found) {
        found = communicatingClasses(p, k, offset);
        classesByPattern.set(key, found);
      }
      lastClasses = found;
      last.set(pattern);
    }
    const result = stationaryGivenClasses(p, k, offset, lastClasses!);
    return result.unique ? result.mix : null;
  };
}
