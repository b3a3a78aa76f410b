import type { MatrixDraws } from '../uncertainty/draws.js';
import type { LandscapeTarget } from '../scenario/scenario.js';
import type { RowChangeOutcome } from '../chain/row-change.js';
import type { RunPlan } from './plan.js';
import type { DrawLayout } from './layout.js';
import { projectDraws, projectionState, type ProjectionInputs } from './project-chunk.js';


export interface Trajectories extends DrawLayout {
  readonly draws: number;
  readonly horizon: number;
  readonly k: number;
  /** The steps whose shares were kept, increasing. */
  readonly recorded: readonly number[];
  /** Layout [recorded step][state][draw] (see layout.ts). */
  readonly shares: Float64Array;
  /** See ProjectionState (project-chunk.ts). */
  readonly firstAtTarget: Int32Array;
  readonly targetRunAtHorizon: Int32Array;
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
  readonly onOutcome?: (draw: number, treatment: number, outcome: RowChangeOutcome) => void;
  /** Year-to-year variation (project-chunk.ts): per draw and row κ, and the year streams' keys. */
  readonly variation?: ProjectionInputs['variation'];
}

/**
 * Every recorded step of every draw at once, in one pass of the projection kernel
 * (project-chunk.ts) over all years: for tests, the bench and small runs that want the mixes
 * themselves. Forecasts and comparisons never hold this ([step][state][draw] of 1,000,000 draws ×
 * 101 years × 10 states is 8 GB); they run the same kernel a chunk of years at a time
 * (simulate.ts) and summarise each year as it is made.
 */
export function propagate(matrices: MatrixDraws, start: ArrayLike<number>, horizon: number, options: PropagateOptions = {}): Trajectories {
  const { k, count: D, data: P } = matrices;
  const steps = horizon + 1;
  const recorded = options.record ? [...options.record] : Array.from({ length: steps }, (_, t) => t);
  const slotOf = new Int32Array(steps).fill(-1);
  recorded.forEach((t, r) => { slotOf[t] = r; });
  const shares = new Float64Array(D * recorded.length * k);
  const plan = options.plan;
  const state = projectionState(D, k, plan ? plan.subPopulations.length : 1);
  projectDraws({ P, k, draws: D, horizon, start, plan, hits: options.hits ?? [], target: options.target, onOutcome: options.onOutcome, variation: options.variation },
    state, 0, D, 0, steps, slotOf, shares);
  const { firstAtTarget, targetRunAtHorizon, firstMostCommon } = state;
  return { draws: D, slots: recorded.length, horizon, k, recorded, shares, firstAtTarget, targetRunAtHorizon, firstMostCommon };
}
