import { periodList, type PeriodCounts } from './counts.js';
import { concentrationMle } from './concentration-mle.js';
import { rowPeriods, type RowPeriods } from './row-periods.js';

/**
 * Partial pooling of zones (Gelman et al. 2013, *Bayesian Data Analysis* 3rd ed., ch. 5: the
 * hierarchical model and its shrinkage): zone z's row i is drawn from Dirichlet(κᵢ·pᵢ) around a
 * shared row pᵢ, and the zone's one-step transitions out of i are multinomial given its row. Each
 * zone's counts out of a state are then Dirichlet–multinomial(κᵢ·pᵢ) — the year-to-year variation
 * model with zones in place of survey periods, so the same code estimates it: a zone's counts are
 * handed over as a "period" (row-periods.ts), κᵢ and pᵢ come from Minka's fixed point
 * (concentration-mle.ts) and their posterior from the κ sampler (uncertainty/concentration.ts).
 */
export function zonePeriods(zoneCounts: readonly Float64Array[], k: number): PeriodCounts[] {
  return periodList(new Map(zoneCounts.map((counts, z) => [z, counts])), k);
}

/**
 * Each row's counts zone by zone (`times` hold zone indices; zones with no transition out of the
 * row are left out), the zones' periods made once for every row.
 */
export function zoneRows(zoneCounts: readonly Float64Array[], mask: Uint8Array, k: number): RowPeriods[] {
  const periods = zonePeriods(zoneCounts, k);
  return Array.from({ length: k }, (_, row) => rowPeriods(periods, mask, k, row));
}

export interface PartialPooling {
  /** Per state: κᵢ, the maximum-likelihood concentration (Infinity: zones no more unlike than sampling allows). */
  readonly kappa: Float64Array;
  /** k×k: the shared rows pᵢ. */
  readonly shared: Float64Array;
  /** Per zone, k×k: the zone's rows given (κ, p), (κᵢpᵢ + n_zi)/(κᵢ + N_zi) — its posterior mean row. */
  readonly rows: readonly Float64Array[];
  /** Per zone, k wide: κᵢ/(κᵢ + N_zi), the weight of the shared row in the zone's row (1: taken whole; 0: its own counts alone). */
  readonly pull: readonly Float64Array[];
}

/**
 * The point estimate of partial pooling: κᵢ and pᵢ by maximum likelihood of the zones' counts
 * (empirical Bayes), then each zone's row as the posterior mean given them. `fallback` (k×k) is
 * the row a state takes when no zone ever left it (the pooled fit's MLE row, which for a state never left is its prior mean). With κᵢ = ∞ every
 * zone's row is the pooled maximum-likelihood row; with κᵢ → 0 each zone keeps its own counts.
 */
export function partialPoolingMle(zoneCounts: readonly Float64Array[], mask: Uint8Array, k: number, fallback: Float64Array): PartialPooling {
  const kappa = new Float64Array(k);
  const shared = new Float64Array(k * k);
  const Z = zoneCounts.length;
  const rows = zoneCounts.map(() => new Float64Array(k * k));
  const pull = zoneCounts.map(() => new Float64Array(k));
  const byRow = zoneRows(zoneCounts, mask, k);
  for (let i = 0; i < k; i++) {
    const r = byRow[i]!;
    if (r.totals.length === 0) {
      kappa[i] = Infinity;
      for (let j = 0; j < k; j++) shared[i * k + j] = fallback[i * k + j]!;
    } else if (r.cells.length < 2) {
      kappa[i] = Infinity;
      shared[i * k + r.cells[0]!] = 1;
    } else {
      const mle = concentrationMle(r);
      kappa[i] = mle.kappa;
      r.cells.forEach((j, c) => { shared[i * k + j] = mle.mean[c]!; });
    }
    for (let z = 0; z < Z; z++) {
      let N = 0;
      for (let j = 0; j < k; j++) N += zoneCounts[z]![i * k + j]!;
      const K = kappa[i]!;
      const w = K === Infinity ? 1 : N === 0 ? 1 : K / (K + N);
      pull[z]![i] = w;
      for (let j = 0; j < k; j++) {
        const own = N > 0 ? zoneCounts[z]![i * k + j]! / N : 0;
        rows[z]![i * k + j] = w * shared[i * k + j]! + (1 - w) * own;
      }
    }
  }
  return { kappa, shared, rows, pull };
}
