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
  /**
   * With observer error (uncertainty/augment-errors.ts): `latent` then holds every one-step
   * transition of the true paths (nothing is observed exactly), and this the rest of each sweep.
   */
  readonly errors?: ErrorSweeps;
}

/** What each retained sweep of the error-model sampler keeps besides the true transitions. */
export interface ErrorSweeps {
  /** retained × k × k: the error matrix drawn, row = true state, column = recorded (for predictions as recorded). */
  readonly emissions: Float64Array;
  /** retained × k: sites in each true state at the latest survey time (the forecast's start). */
  readonly latest: Float64Array;
  /** Split-R̂ and bulk ESS of each cell of the error matrix (NaN where it never varies). */
  readonly rhat: Float64Array;
  readonly ess: Float64Array;
  /**
   * With one error matrix per observer (fit/error-model.ts): every assessed observer's matrix per
   * retained sweep (retained × observers × k × k, observer after observer within a sweep) and
   * their diagnostics (observers × k × k). `emissions` above is then the pooled matrix.
   */
  readonly observers?: { readonly emissions: Float64Array; readonly rhat: Float64Array; readonly ess: Float64Array };
}
