import { toRows } from '../chain/matrix.js';
import { fitMle, siteCount, type Fit } from './fit.js';
import { zonePooling } from './zones.js';
import { zoneSamplerExtremes, type ZoneSamplerRun } from './zone-sampler.js';

/** How far a zone's rows moved from its own maximum-likelihood rows, and how much of the shared row each took. */
export interface ZoneShift {
  readonly name: string;
  /** k×k: the zone's rows as the forecast's point takes them (partial: shrunk; none: its own MLE). */
  readonly rows: Float64Array;
  /** k×k: the zone's own maximum-likelihood rows. */
  readonly own: Float64Array;
  /** Per state: the shared row's weight κᵢ/(κᵢ + N_zi) (none: 0). */
  readonly pull: Float64Array;
  /** Per state: the largest change of any cell, |zone row − own row|. */
  readonly change: Float64Array;
}

/** Each zone's rows beside its own fit's: what the fit table and fit JSON report for a zoned fit. */
export function zoneShifts(fit: Fit): ZoneShift[] {
  const k = fit.states.length;
  const zones = fit.zones!;
  const pooling = zones.pooling === 'partial' ? zonePooling(fit) : undefined;
  return zones.zones.map((zone, z) => {
    const own = fitMle(zone.fit).p;
    const rows = pooling ? pooling.rows[z]! : own;
    const change = new Float64Array(k);
    for (let c = 0; c < k * k; c++) {
      const i = Math.floor(c / k);
      change[i] = Math.max(change[i]!, Math.abs(rows[c]! - own[c]!));
    }
    return { name: zone.name, rows, own, pull: pooling ? pooling.pull[z]! : new Float64Array(k), change };
  });
}

/**
 * The `zones` block of a fit file: the column, the pooling, the shared rows and κ (partial), and
 * per zone what it was pulled by, then its own fit in full (`fit`: the same keys as a fit file, read
 * back by the same checks). κ = ∞ is written null (JSON has no infinity).
 */
export function zonesToJson(fit: Fit, zoneJson: (zone: Fit) => object): object | null {
  if (!fit.zones) return null;
  const k = fit.states.length;
  const pooling = fit.zones.pooling === 'partial' ? zonePooling(fit) : undefined;
  const shifts = zoneShifts(fit);
  return {
    column: fit.zones.column,
    pooling: fit.zones.pooling,
    shared: pooling ? {
      kappa: Array.from(pooling.kappa, (x) => (Number.isFinite(x) ? x : null)),
      probabilities: toRows(pooling.shared, k),
    } : null,
    // Only once `sere fit` has run the sampler (partial pooling): a zoned file without it keeps its bytes.
    ...(fit.zones.sampler ? { posterior_sampler: zoneSamplerJson(fit.zones.sampler, k) } : {}),
    zones: fit.zones.zones.map((zone, z) => {
      const s = shifts[z]!;
      return {
        name: zone.name,
        sites: siteCount(zone.fit),
        transitions: zone.fit.transitions,
        probabilities: toRows(s.rows, k),
        own_probabilities: toRows(s.own, k),
        pull: Array.from(s.pull),
        largest_change: Array.from(s.change),
        ...(fit.zones!.sampler ? { sampler_rhat: cells(fit.zones!.sampler.zones.rhat, z, k), sampler_ess: cells(fit.zones!.sampler.zones.ess, z, k) } : {}),
        fit: zoneJson(zone.fit),
      };
    }),
  };
}

const finite = (x: number): number | null => (Number.isFinite(x) ? x : null);

/** Zone z's k×k block of a Z×k×k diagnostics array, as rows (null where the cell never varies). */
function cells(values: Float64Array, z: number, k: number): (number | null)[][] {
  return toRows(Array.from(values.subarray(z * k * k, (z + 1) * k * k), finite), k);
}

/** The zones' posterior sampler: its settings and diagnostics (fit/zone-sampler.ts); each zone's cells sit with the zone. */
export function zoneSamplerJson(run: ZoneSamplerRun, k: number): object {
  const { rhatMax, essMin } = zoneSamplerExtremes(run);
  return {
    method: run.augmented ? 'partial pooling by data augmentation over the gaps (slice-sampled κ and shared rows)' : 'partial pooling (slice-sampled κ and shared rows)',
    seed: run.seed,
    chains: run.chains,
    warm_up: run.warmUp,
    thin: run.thin,
    kept: run.kept,
    rhat_max: rhatMax,
    ess_min: essMin,
    kappa_rhat: Array.from(run.kappa.rhat, finite),
    kappa_ess: Array.from(run.kappa.ess, finite),
    shared_rhat: toRows(Array.from(run.shared.rhat, finite), k),
    shared_ess: toRows(Array.from(run.shared.ess, finite), k),
  };
}
