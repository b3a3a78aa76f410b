import { blockCount, DRAW_BLOCK, sharedFloat64 } from '../uncertainty/draw-blocks.js';
import type { RunPlan } from './plan.js';
import { fillPlanMatrices, planWorkspace } from './plan-matrices.js';
import { StationaryByPattern } from './stationary-by-pattern.js';
import type { StationaryDraws } from './stationary-draws.js';

/**
 * The long-run mixes of a set of draws, worked out a block of draws at a time on any thread
 * (thread-pool.ts, phase 'stationary'): each draw's mix is written to `mixes[d·k …]` and `unique[d]`
 * set to 1 when it is unique, then `gathered` packs the unique ones in draw order — the numbers the
 * one-thread loops made, as each draw's arithmetic is the same wherever it runs. Why: a zoned,
 * treated forecast spent ~0.1 s of its main thread here while the worker idled (the zoned demo's
 * `--cpu-prof`), and a comparison works one out per alternative. Data only, so it can be posted.
 */
export type StationaryJob = {
  readonly k: number;
  readonly count: number;
  /** MatrixDraws.data: count × k × k, or with zones Z × count × k × k. */
  readonly data: Float64Array;
  readonly mixes: Float64Array;
  readonly unique: Uint8Array;
} & (
  /** Each draw's matrix; with `shares`, Σ_z shares[z]·π_z over the zones' matrices (zones exchange no land). */
  | { readonly kind: 'draws'; readonly shares?: Float64Array }
  /**
   * The treated chain of treated-stationary.ts: each sub-population's recipe `recipes[g]` built from
   * the draw (fillPlanMatrices), Σ_g weights[g]·π_g.
   */
  | { readonly kind: 'treated'; readonly plan: RunPlan; readonly recipes: Int32Array; readonly weights: Float64Array }
);

/** A job's outputs, in shared memory, for `count` draws of k states. */
export function stationaryOutputs(count: number, k: number): Pick<StationaryJob, 'mixes' | 'unique'> {
  return { mixes: sharedFloat64(count * k), unique: new Uint8Array(new SharedArrayBuffer(Math.max(1, count))) };
}

export function stationaryTaskCount(job: StationaryJob): number {
  return blockCount(job.count);
}

/** Block b of the job's draws. */
export function stationaryBlock(job: StationaryJob, b: number): void {
  const { k, count, data, mixes, unique } = job;
  const k2 = k * k;
  const stationary = new StationaryByPattern(k);
  const d1 = Math.min(count, (b + 1) * DRAW_BLOCK);
  if (job.kind === 'draws' && !job.shares) {
    for (let d = b * DRAW_BLOCK; d < d1; d++) {
      const mix = stationary.mixOf(data, d * k2);
      if (mix) { mixes.set(mix, d * k); unique[d] = 1; }
    }
    return;
  }
  if (job.kind === 'draws') {
    // Zone z's matrix of draw d at (z·count + d)·k².
    const bases = Int32Array.from(job.shares!, (_, z) => z * count * k2);
    for (let d = b * DRAW_BLOCK; d < d1; d++) unique[d] = mixtureInto(job, d, stationary, data, bases, d * k2, job.shares!) ? 1 : 0;
    return;
  }
  // Recipe g's matrix of the draw, built into the workspace, at recipes[g]·k².
  const { plan, recipes, weights } = job;
  const ws = planWorkspace(plan);
  const bases = Int32Array.from(recipes, (p) => p * k2);
  for (let d = b * DRAW_BLOCK; d < d1; d++) {
    fillPlanMatrices(plan, data, d * k2, ws, undefined, count * k2);
    unique[d] = mixtureInto(job, d, stationary, ws.matrices, bases, 0, weights) ? 1 : 0;
  }
}

/**
 * Σ_g weights[g]·π_g into `mixes[d·k …]`, π_g the mix of the k × k matrix at `source[bases[g] + shift …]`,
 * added in order of g; false (the rest left as it is) when one of them has no unique mix.
 */
function mixtureInto(job: StationaryJob, d: number, stationary: StationaryByPattern, source: Float64Array,
  bases: Int32Array, shift: number, weights: Float64Array): boolean {
  const { k, mixes } = job;
  for (let g = 0; g < bases.length; g++) {
    const mix = stationary.mixOf(source, bases[g]! + shift);
    if (!mix) return false;
    for (let s = 0; s < k; s++) mixes[d * k + s] = (g === 0 ? 0 : mixes[d * k + s]!) + weights[g]! * mix[s]!;
  }
  return true;
}

/** The unique draws' mixes, packed in draw order. */
export function gathered(job: StationaryJob): StationaryDraws {
  const { k, count, mixes, unique } = job;
  const out = new Float64Array(count * k);
  let n = 0;
  for (let d = 0; d < count; d++) {
    if (unique[d] !== 1) continue;
    for (let s = 0; s < k; s++) out[n * k + s] = mixes[d * k + s]!;
    n += 1;
  }
  return { mixes: out.subarray(0, n * k), unique: n, notUnique: count - n };
}
