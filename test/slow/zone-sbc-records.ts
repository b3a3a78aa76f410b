import { KAPPA_PRIOR_SCALE } from '../../src/uncertainty/concentration.js';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import type { RandomStream } from '../../src/uncertainty/random.js';

/**
 * What the partial-pooling SBC tests share: the three-state layout (row 0 free, rows 1 and 2 kept
 * in place by structural zeros), the prior draw of a row's shared (κ, p) and of each zone's row
 * around it, and the binning of ranks (Talts et al. 2018).
 */
export const K = 3;
export const MASK = Uint8Array.from([0, 0, 0, 1, 0, 1, 1, 1, 0]);
export const PRIOR = Float64Array.from(MASK, (m) => (m ? 0 : 0.5));
/** Draws ranked per record, 50 kept samples apart (nearly independent, as the method asks). */
export const L = 19;
export const BINS = 10;
export const PICKS = Array.from({ length: L }, (_, l) => 25 + l * 50);

/** κ from the stated prior (log-logistic, scale 50: κ/(κ + 50) uniform) and p ~ Dirichlet(0.5, 0.5, 0.5). */
export function sharedRow(rep: RandomStream): { kappa: number; p: Float64Array } {
  const u = rep.uniform();
  const kappa = (KAPPA_PRIOR_SCALE * u) / (1 - u);
  const p = new Float64Array(3);
  sampleDirichlet(rep, [0.5, 0.5, 0.5], 0, 3, p, 0);
  return { kappa, p };
}

/** One zone's row 0 from Dirichlet(κp), into `theta`. */
export function zoneRow(rep: RandomStream, kappa: number, p: Float64Array, theta: Float64Array): void {
  sampleDirichlet(rep, Array.from(p, (x) => x * kappa), 0, 3, theta, 0);
}

/** Adds a rank 0 … L into its bin. */
export function binRank(bins: number[], rank: number): void {
  bins[Math.floor(rank / ((L + 1) / BINS))]! += 1;
}
