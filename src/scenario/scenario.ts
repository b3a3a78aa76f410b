import type { Fit } from '../fit/fit.js';

/** A scenario with every reference resolved against its fit: what the engine runs. */
export interface Scenario {
  readonly name: string;
  readonly file: string;
  readonly sha256: string;
  readonly fit: Fit;
  readonly source: 'posterior' | 'bootstrap' | 'point';
  readonly draws: number;
  /** Absent when the scenario names none; the CLI then picks one and prints it. */
  readonly seed?: number;
  readonly start: { readonly year: number; readonly shares: Float64Array; readonly from: 'latest' | 'given' };
  readonly horizonSteps: number;
  /** Steps after the start shown in the terminal table. */
  readonly showSteps: readonly number[];
  readonly level: number;
  readonly target?: DominanceTarget;
}

/** A landscape-level goal: the target state's share of the whole area reaching a threshold. */
export interface DominanceTarget {
  readonly state: number;
  /** Share of the area at or above which the target state "dominates". */
  readonly share: number;
}
