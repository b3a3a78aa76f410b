import type { MatrixDraws } from '../uncertainty/draws.js';
import type { DominanceTarget } from '../scenario/scenario.js';

/** A share within this of the largest counts as "most common" too (ties after rounding). */
export const MOST_COMMON_TOLERANCE = 1e-12;


export interface Trajectories {
  readonly draws: number;
  readonly horizon: number;
  readonly k: number;
  /** The steps whose shares were kept, increasing. */
  readonly recorded: readonly number[];
  /** Layout [draw][recorded step][state]: `shares[(d*recorded.length + r)*k + s]`. */
  readonly shares: Float64Array;
  /** Per draw, first step the target's share reaches its threshold, or −1 within the horizon. */
  readonly firstAtTarget: Int32Array;
  /** Per draw and state `[d*k + s]`: first step the state is the most common one, or −1. */
  readonly firstMostCommon: Int32Array;
}

export interface PropagateOptions {
  readonly target?: DominanceTarget;
  /** Steps whose shares to keep (default: every step 0 … horizon). */
  readonly record?: readonly number[];
  readonly onProgress?: (done: number, total: number) => void;
}

/**
 * Propagate the starting mix through each draw's matrix: x_{t+1} = x_t P_d (row vector times a
 * row-stochastic matrix), for t = 0 … horizon − 1, keeping the shares at the recorded steps and
 * tracking, at every step, when the target first dominates and when each state first becomes the
 * most common.
 *
 * The hot loop of sere: D × H × k² multiply-adds over flat typed arrays, two scratch rows, no
 * allocation inside. Only the recorded steps are stored, because memory, not arithmetic, is the
 * cost at scale (100,000 draws × 101 steps × 10 states would be 808 MB). Shares are not
 * renormalised: every sampler divides each row by its own sum, so rows sum to 1 within a few ulps
 * and the total share drifts by about horizon × 1e-16.
 */
export function propagate(draws: MatrixDraws, start: ArrayLike<number>, horizon: number, options: PropagateOptions = {}): Trajectories {
  const { target, onProgress } = options;
  const { k, count: D, data: P } = draws;
  const steps = horizon + 1;
  const recorded = options.record ? [...options.record] : Array.from({ length: steps }, (_, t) => t);
  const slotOf = new Int32Array(steps).fill(-1);
  recorded.forEach((t, r) => { slotOf[t] = r; });
  const R = recorded.length;
  const shares = new Float64Array(D * R * k);
  const firstAtTarget = new Int32Array(D).fill(-1);
  const firstMostCommon = new Int32Array(D * k).fill(-1);
  let x = new Float64Array(k);
  let y = new Float64Array(k);
  const progressEvery = 1024;
  for (let d = 0; d < D; d++) {
    const base = d * k * k;
    for (let s = 0; s < k; s++) x[s] = start[s]!;
    for (let t = 0; t < steps; t++) {
      if (t > 0) {
        const x0 = x[0]!;
        for (let j = 0; j < k; j++) y[j] = x0 * P[base + j]!;
        for (let i = 1; i < k; i++) {
          const xi = x[i]!;
          if (xi === 0) continue;
          const row = base + i * k;
          for (let j = 0; j < k; j++) y[j] += xi * P[row + j]!;
        }
        const swap = x; x = y; y = swap;
      }
      const slot = slotOf[t]!;
      if (slot >= 0) {
        const out = (d * R + slot) * k;
        for (let s = 0; s < k; s++) shares[out + s] = x[s]!;
      }
      let largest = 0;
      for (let s = 0; s < k; s++) if (x[s]! > largest) largest = x[s]!;
      for (let s = 0; s < k; s++) {
        if (firstMostCommon[d * k + s] === -1 && x[s]! >= largest - MOST_COMMON_TOLERANCE) firstMostCommon[d * k + s] = t;
      }
      if (target && firstAtTarget[d] === -1 && x[target.state]! >= target.share) firstAtTarget[d] = t;
    }
    if (onProgress && (d + 1) % progressEvery === 0) onProgress(d + 1, D);
  }
  onProgress?.(D, D);
  return { draws: D, horizon, k, recorded, shares, firstAtTarget, firstMostCommon };
}
