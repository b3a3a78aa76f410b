import { logRising } from '../chain/dirichlet-multinomial.js';
import type { RowPeriods } from '../chain/row-periods.js';
import type { RandomStream } from './random.js';
import { sliceStep } from './slice.js';

/**
 * Year-to-year variation of one row, the hierarchical model: in survey period t the row is
 * Yₜ ~ Dirichlet(κ·p) around the mean row p, and the period's transitions are Multinomial(Nₜ, Yₜ),
 * so each period's counts are Dirichlet–multinomial(κ·p) (Mosimann 1962). κ, the concentration,
 * says how alike the years are: a year's cell has variance pⱼ(1 − pⱼ)/(κ + 1), and κ → ∞ is
 * today's chain with one fixed matrix.
 *
 * Priors (stated): p ~ Dirichlet(α) with the fit's own pseudo-counts (Jeffreys 0.5 per possible
 * cell unless the fit says otherwise; structural zeros are not cells at all); κ log-logistic with
 * scale κ₀ = KAPPA_PRIOR_SCALE, density κ₀/(κ₀ + κ)², i.e. κ/(κ + κ₀) uniform on (0, 1): median
 * 50 — a probability of 0.2 then varies by ±0.06 (one sd) from year to year — with 90% of the
 * prior mass between 2.6 (years very unlike) and 950 (alike), a tail heavy enough that records
 * whose years agree take κ into the thousands. Our choice, not a published default: a median of
 * 10 (±0.12) gave records whose periods agree (the demo: p = 0.19) bands driven by the prior.
 *
 * Sampler: coordinate-wise slice sampling (Neal 2003) of the joint posterior of (log κ, p), with p
 * as additive log-ratios against the most observed cell (z_c = log p_c/p_ref; the Dirichlet prior
 * with the change of variables gives Σ αⱼ log pⱼ), one slice update per coordinate per sweep,
 * BURN_IN sweeps discarded and THIN sweeps between kept samples. The likelihood is evaluated on the
 * distinct count values of each cell and period total, with their multiplicities — exact, and much
 * cheaper than period by period on long records.
 */
export const KAPPA_PRIOR_SCALE = 50;
export const BURN_IN = 100;
export const THIN = 1;
/** Slice width on the log scale and the most widths stepped out (Neal 2003, §4.1). */
const WIDTH = 1.5;
const MAX_STEPS = 40;

export interface RowConcentrationSamples {
  /** Per kept sample: κ. */
  readonly kappa: Float64Array;
  /** Per kept sample, the mean row over `cells`: `mean[s*m + c]`. */
  readonly mean: Float64Array;
}

/** Where a row's chain stands: κ and the mean row over its possible cells. */
export interface ConcentrationState {
  readonly kappa: number;
  readonly mean: ArrayLike<number>;
}

/** Log prior density of κ (log-logistic, scale κ₀), on κ itself. */
export function logKappaPrior(kappa: number): number {
  return Math.log(KAPPA_PRIOR_SCALE) - 2 * Math.log(KAPPA_PRIOR_SCALE + kappa);
}

/**
 * `samples` posterior draws of (κ, p) for one row, from `random`. `alpha` is the prior on the
 * row's possible cells (length m = r.cells.length ≥ 2). `start` continues a chain from where an
 * earlier call left it (its κ and mean row over the same cells), as the zones' data augmentation
 * does when the counts change between its sweeps (zone-augment.ts); without it the chain starts at
 * κ = κ₀ around the smoothed pooled row.
 */
export function sampleRowConcentration(r: RowPeriods, alpha: ArrayLike<number>, samples: number, random: RandomStream,
  schedule: { readonly burnIn?: number; readonly thin?: number; readonly start?: ConcentrationState } = {}): RowConcentrationSamples {
  const burnIn = schedule.burnIn ?? BURN_IN;
  const thin = schedule.thin ?? THIN;
  const m = r.cells.length;
  if (m < 2) throw new Error('a row with one possible cell has no variation to sample');
  const T = r.totals.length;
  // Distinct values with multiplicities: per cell the non-zero counts, and the period totals.
  const cellValues: Float64Array[] = [];
  const cellTimes: Float64Array[] = [];
  for (let c = 0; c < m; c++) {
    const tally = new Map<number, number>();
    for (let t = 0; t < T; t++) { const n = r.counts[t * m + c]!; if (n > 0) tally.set(n, (tally.get(n) ?? 0) + 1); }
    cellValues.push(Float64Array.from(tally.keys()));
    cellTimes.push(Float64Array.from(tally.values()));
  }
  const totalTally = new Map<number, number>();
  for (let t = 0; t < T; t++) totalTally.set(r.totals[t]!, (totalTally.get(r.totals[t]!) ?? 0) + 1);
  const totalValues = Float64Array.from(totalTally.keys());
  const totalTimes = Float64Array.from(totalTally.values());

  const pooled = new Float64Array(m);
  for (let t = 0; t < T; t++) for (let c = 0; c < m; c++) pooled[c] += r.counts[t * m + c]!;
  let ref = 0;
  for (let c = 1; c < m; c++) if (pooled[c]! > pooled[ref]!) ref = c;

  // z[0] = log κ; z[1 + c] = log(p_c / p_ref) for c ≠ ref (z[1 + ref] stays 0).
  const z = new Float64Array(m + 1);
  const start = schedule.start;
  z[0] = Math.log(start ? start.kappa : KAPPA_PRIOR_SCALE);
  for (let c = 0; c < m; c++) {
    z[1 + c] = start ? Math.log(start.mean[c]! / start.mean[ref]!) : Math.log((pooled[c]! + alpha[c]!) / (pooled[ref]! + alpha[ref]!));
  }
  const logP = new Float64Array(m);
  let cachedKappa = NaN;
  let cachedTotals = 0;

  const logTarget = (): number => {
    let top = -Infinity;
    for (let c = 0; c < m; c++) top = Math.max(top, z[1 + c]!);
    let sum = 0;
    for (let c = 0; c < m; c++) sum += Math.exp(z[1 + c]! - top);
    const logSum = top + Math.log(sum);
    const kappa = Math.exp(z[0]!);
    if (!(kappa > 0) || !Number.isFinite(kappa)) return -Infinity;
    let value = logKappaPrior(kappa) + z[0]!; // prior on κ and the Jacobian of log κ
    for (let c = 0; c < m; c++) {
      logP[c] = z[1 + c]! - logSum;
      value += alpha[c]! * logP[c]!;
    }
    // The period totals' term depends on κ alone: kept while the mean row's coordinates move.
    if (kappa !== cachedKappa) {
      cachedKappa = kappa;
      cachedTotals = 0;
      for (let v = 0; v < totalValues.length; v++) cachedTotals -= totalTimes[v]! * logRising(kappa, totalValues[v]!);
    }
    value += cachedTotals;
    for (let c = 0; c < m; c++) {
      const values = cellValues[c]!;
      if (values.length === 0) continue;
      const a = kappa * Math.exp(logP[c]!);
      if (!(a > 0)) return -Infinity;
      const times = cellTimes[c]!;
      for (let v = 0; v < values.length; v++) value += times[v]! * logRising(a, values[v]!);
    }
    return value;
  };

  const kappa = new Float64Array(samples);
  const mean = new Float64Array(samples * m);
  const coordinates = [0, ...Array.from({ length: m }, (_, c) => 1 + c).filter((i) => i !== 1 + ref)];
  let current = logTarget();
  const sweeps = burnIn + samples * thin;
  for (let sweep = 0; sweep < sweeps; sweep++) {
    for (const i of coordinates) {
      const at = (x: number): number => { z[i] = x; return logTarget(); };
      const step = sliceStep(z[i]!, at, random.uniform, WIDTH, MAX_STEPS, current);
      z[i] = step.x;
      current = step.logDensity;
    }
    const kept = sweep - burnIn + 1;
    if (kept > 0 && kept % thin === 0) {
      const s = kept / thin - 1;
      logTarget(); // refresh logP at the current z
      kappa[s] = Math.exp(z[0]!);
      for (let c = 0; c < m; c++) mean[s * m + c] = Math.exp(logP[c]!);
    }
  }
  return { kappa, mean };
}
