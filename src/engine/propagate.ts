import type { MatrixDraws } from '../uncertainty/draws.js';
import type { LandscapeTarget } from '../scenario/scenario.js';
import type { RowChangeOutcome } from '../chain/row-change.js';
import type { RunPlan } from './plan.js';
import { fillPlanMatrices, planWorkspace } from './plan-matrices.js';
import type { DrawLayout } from './layout.js';
import { targetBounds } from './target.js';

/** Draws per block of recorded output (see the loop); 256 draws × 51 steps × 6 states fits in cache. */
const BLOCK = 256;

/** A share within this of the largest counts as "most common" too (ties after rounding). */
export const MOST_COMMON_TOLERANCE = 1e-12;

export interface Trajectories extends DrawLayout {
  readonly draws: number;
  readonly horizon: number;
  readonly k: number;
  /** The steps whose shares were kept, increasing. */
  readonly recorded: readonly number[];
  /** Layout [recorded step][state][draw] (see layout.ts). */
  readonly shares: Float64Array;
  /**
   * Per draw, the first step from which the target holds `staysMet` consecutive steps within the
   * horizon (with staysMet 1: the first step it is met), or −1.
   */
  readonly firstAtTarget: Int32Array;
  /**
   * Per draw, how many consecutive steps the target has held up to and including the horizon (0:
   * not met at the horizon; horizon + 1: met in every step from the start).
   */
  readonly targetRunAtHorizon: Int32Array;
  /** Per draw and state `[d*k + s]`: first step the state is the most common one, or −1. */
  readonly firstMostCommon: Int32Array;
}

export interface PropagateOptions {
  readonly target?: LandscapeTarget;
  /** Steps whose shares to keep (default: every step 0 … horizon). */
  readonly record?: readonly number[];
  /** Treatments, sub-populations and events; default: the drawn matrix every step. */
  readonly plan?: RunPlan;
  /** For each of `plan.landscapeEvents`, the years it strikes (see eventHits). */
  readonly hits?: readonly Uint8Array[];
  readonly onProgress?: (done: number, total: number) => void;
  readonly onOutcome?: (draw: number, treatment: number, outcome: RowChangeOutcome) => void;
}

/**
 * Propagate the starting mix through each draw's matrices: x_{t+1} = x_t P (row vector times a
 * row-stochastic matrix) in every sub-population, then landscape events x ← x·E in the years they
 * strike; the landscape's mix is the sum over sub-populations. Keeps the shares at the recorded
 * steps and tracks, at every step, whether the target is met (the length of the run of years it
 * has held, so a target that must stay met is found in the same pass) and when each state first
 * becomes the most common.
 *
 * The hot loop of sere: D × H × G × k² multiply-adds over flat typed arrays with scratch rows made
 * once, no allocation inside. Only the recorded steps are stored, because memory, not arithmetic,
 * is the cost at scale (100,000 draws × 101 steps × 10 states would be 808 MB). Shares are not
 * renormalised: every matrix row sums to 1 within a few ulps, so the total share drifts by about
 * horizon × 1e-16.
 */
export function propagate(matrices: MatrixDraws, start: ArrayLike<number>, horizon: number, options: PropagateOptions = {}): Trajectories {
  const { target, onProgress, onOutcome, plan, hits = [] } = options;
  const { k, count: D, data: P } = matrices;
  const k2 = k * k;
  const steps = horizon + 1;
  const recorded = options.record ? [...options.record] : Array.from({ length: steps }, (_, t) => t);
  const slotOf = new Int32Array(steps).fill(-1);
  recorded.forEach((t, r) => { slotOf[t] = r; });
  const R = recorded.length;
  const shares = new Float64Array(D * R * k);
  const firstAtTarget = new Int32Array(D).fill(-1);
  const targetRunAtHorizon = new Int32Array(D);
  const members = target ? Int32Array.from(target.states) : new Int32Array(0);
  const staysMet = target ? target.staysMet : 1;
  const nMembers = members.length;
  const { low: metLow, high: metHigh } = target ? targetBounds(target) : { low: 0, high: 0 };
  const firstMostCommon = new Int32Array(D * k).fill(-1);

  const trivial = !plan || plan.trivial;
  const G = plan ? plan.subPopulations.length : 1;
  const weights = plan ? plan.subPopulations.map((g) => g.weight) : [1];
  const planOf = plan?.planOf;
  const landscape = plan ? plan.landscapeEvents.map((e) => plan.events[e]!.matrix) : [];
  const events = landscape.length;
  const ws = plan && !trivial ? planWorkspace(plan) : undefined;
  const xs = new Float64Array(G * k);
  const total = new Float64Array(k);
  const y = new Float64Array(k);
  const z = new Float64Array(k);
  const progressEvery = 1024;

  // Draws run in blocks whose recorded mixes go to a small [step][state][draw-in-block] buffer,
  // copied out as runs of BLOCK numbers: writing straight into the [step][state][draw] layout
  // touched a new cache line for every number (measured: a third of a comparison's time).
  const block = new Float64Array(R * k * BLOCK);
  for (let d = 0; d < D; d++) {
    const b = d % BLOCK;
    if (ws) fillPlanMatrices(plan!, P, d * k2, ws, onOutcome && ((tr, outcome) => onOutcome(d, tr, outcome)));
    const M = ws ? ws.matrices : P;
    const hitRow = d * steps;
    let pending = k; // states not yet seen as the most common
    let runStart = -1; // first step of the current run of steps meeting the target, −1 when not met
    for (let g = 0; g < G; g++) for (let s = 0; s < k; s++) xs[g * k + s] = weights[g]! * start[s]!;
    for (let s = 0; s < k; s++) total[s] = start[s]!;
    for (let t = 0; t < steps; t++) {
      if (t > 0) {
        for (let g = 0; g < G; g++) {
          const base = ws ? planOf![t * G + g]! * k2 : d * k2;
          const xo = g * k;
          const x0 = xs[xo]!;
          for (let j = 0; j < k; j++) y[j] = x0 * M[base + j]!;
          for (let i = 1; i < k; i++) {
            const xi = xs[xo + i]!;
            if (xi === 0) continue;
            const row = base + i * k;
            for (let j = 0; j < k; j++) y[j] += xi * M[row + j]!;
          }
          for (let e = 0; e < events; e++) {
            if (hits[e]![hitRow + t] === 0) continue;
            const E = landscape[e]!;
            z.fill(0);
            for (let i = 0; i < k; i++) { const yi = y[i]!; if (yi !== 0) for (let j = 0; j < k; j++) z[j] += yi * E[i * k + j]!; }
            y.set(z);
          }
          // The landscape's mix is the sum over sub-populations: assign for the first, add after.
          if (g === 0) for (let s = 0; s < k; s++) { xs[xo + s] = y[s]!; total[s] = y[s]!; }
          else for (let s = 0; s < k; s++) { xs[xo + s] = y[s]!; total[s] += y[s]!; }
        }
      }
      const slot = slotOf[t]!;
      if (slot >= 0) {
        const out = slot * k * BLOCK + b;
        for (let s = 0; s < k; s++) block[out + s * BLOCK] = total[s]!;
      }
      if (pending > 0) {
        let largest = 0;
        for (let s = 0; s < k; s++) if (total[s]! > largest) largest = total[s]!;
        for (let s = 0; s < k; s++) {
          if (firstMostCommon[d * k + s] === -1 && total[s]! >= largest - MOST_COMMON_TOLERANCE) {
            firstMostCommon[d * k + s] = t;
            pending -= 1;
          }
        }
      }
      if (target) {
        let sum = 0;
        for (let n = 0; n < nMembers; n++) sum += total[members[n]!]!;
        if (!(sum >= metLow && sum <= metHigh)) runStart = -1;
        else {
          if (runStart < 0) runStart = t;
          if (firstAtTarget[d] === -1 && t - runStart + 1 >= staysMet) firstAtTarget[d] = runStart;
        }
      }
    }
    if (runStart >= 0) targetRunAtHorizon[d] = horizon - runStart + 1;
    if (b === BLOCK - 1 || d === D - 1) {
      const first = d - b;
      for (let rs = 0; rs < R * k; rs++) shares.set(block.subarray(rs * BLOCK, rs * BLOCK + b + 1), rs * D + first);
    }
    if (onProgress && (d + 1) % progressEvery === 0) onProgress(d + 1, D);
  }
  onProgress?.(D, D);
  return { draws: D, slots: R, horizon, k, recorded, shares, firstAtTarget, targetRunAtHorizon, firstMostCommon };
}
