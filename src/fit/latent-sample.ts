/**
 * What the data-augmentation sampler (uncertainty/augment.ts) keeps of a fit with pairs further
 * apart than one step: for each retained sweep, the one-step transitions of the latent paths
 * between surveys (whole numbers, k×k), and the convergence diagnostics of every cell. It is data,
 * not randomness, so a fit can carry it into its file and every later run draws from it.
 */
export interface LatentSample {
  readonly seed: number;
  readonly chains: number;
  readonly warmUp: number;
  /** Every how many sweeps after the warm-up one was kept. */
  readonly thin: number;
  /** Retained sweeps in all, chain after chain (chains × per chain). */
  readonly retained: number;
  /** retained × k × k: latent one-step counts of each retained sweep, row = from. */
  readonly latent: Float64Array;
  /** Split-R̂ per cell (NaN where a cell never varies: structural zeros, rows with one destination). */
  readonly rhat: Float64Array;
  /** Bulk effective sample size per cell (NaN likewise). */
  readonly ess: Float64Array;
}
