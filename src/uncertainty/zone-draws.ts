import { SereError } from '../errors.js';
import type { Fit } from '../fit/fit.js';
import { fitMask, fitPrior } from '../fit/fit.js';
import { zonePooling } from '../fit/zones.js';
import { sampleZonePosterior, zonePosteriorDiagnostics, type ZoneChainSettings } from './zone-posterior.js';
import type { ZoneSamplerRun } from '../fit/zone-sampler.js';
import type { GapCell } from '../chain/counts.js';
import { possibleCells } from '../chain/row-periods.js';
import { sampleDirichlet } from './dirichlet.js';
import { blockCount, blockName, DRAW_BLOCK, sharedFloat64 } from './draw-blocks.js';
import { drawMatrices, withVariation } from './draw-matrices.js';
import type { MatrixDraws } from './draws.js';
import type { RandomStream } from './random.js';
import type { VariationSpec } from './variation.js';

/**
 * Matrix draws of every zone of a zoned fit, in one MatrixDraws with `zones` set (zone z's draw d
 * at (z·D + d)·k²).
 *
 * none: each zone from its own fit, by the sampler its source names (drawMatrices) — the first zone
 * on `random` itself, the others on `random.stream('zone:NAME')`; so one zone is the unzoned run.
 * partial (Gelman et al. 2013, BDA3 ch. 5): per row, posterior samples of the shared (κᵢ, pᵢ) from
 * the zones' counts by the variation model's sampler (concentration.ts; with pairs further apart
 * than one step, by data augmentation over the zones' bridges: zone-augment.ts), four chains on
 * `zones` / `chain:c` (zone-posterior.ts), then draw d takes sample d mod VARIATION_SAMPLES and
 * every zone's row from its conditional
 * posterior Dirichlet(κᵢpᵢ + n_zi) (stream `block:b` / `zones`) — all zones in draw d share the
 * same (κ, p). A point forecast takes the point estimate (κ̂, p̂ by maximum likelihood). Year-to-year
 * variation is estimated on the pooled record and applied within each zone (κ only).
 */
export function drawZoneMatrices(fit: Fit, source: MatrixDraws['source'], count: number, random: RandomStream,
  variation: VariationSpec = { kind: 'none' }): MatrixDraws {
  const zones = fit.zones!;
  const k = fit.states.length;
  const k2 = k * k;
  const Z = zones.zones.length;
  let sets: MatrixDraws[];
  if (zones.pooling === 'none') {
    sets = zones.zones.map((zone, z) => drawMatrices(zone.fit, source, count, z === 0 ? random : random.stream(`zone:${zone.name}`), variation));
  } else {
    if (source === 'bootstrap') {
      throw new SereError('BAD_ZONES', 'partially pooled zones are drawn from their posterior; the site bootstrap does not resample zones',
        { path: 'uncertainty.source' }, 'use source: posterior (or point), or fit with pooling: none');
    }
    const data = source === 'point' ? pointZones(fit, count) : posteriorZones(fit, count, random);
    const base = { k, count, source, notes: [] } as const;
    const first = withVariation(fit, { ...base, data: data.subarray(0, count * k2) }, variation, random, true);
    sets = zones.zones.map((_, z) => ({ ...first, data: data.subarray(z * count * k2, (z + 1) * count * k2) }));
  }
  const data = sharedFloat64(Z * count * k2);
  sets.forEach((s, z) => data.set(s.data, z * count * k2));
  const varying = sets.some((s) => s.concentration);
  let concentration: Float64Array | undefined;
  if (varying) {
    concentration = sharedFloat64(Z * count * k).fill(Infinity);
    sets.forEach((s, z) => { if (s.concentration) concentration!.set(s.concentration, z * count * k); });
  }
  return {
    k, count, data, source, zones: Z,
    notes: sets.flatMap((s, z) => s.notes.map((n) => `zone ${zones.zones[z]!.name}: ${n}`)),
    ...(concentration ? { concentration } : {}),
    // Partial pooling: one (κ, p) for all zones. None: each zone its own, reported zone by zone.
    // (With one zone, its κ is the landscape's.)
    ...(zones.pooling === 'none' && Z > 1
      ? (sets.some((s) => s.variation) ? { zoneVariation: sets.map((s) => s.variation) } : {})
      : (sets[0]!.variation ? { variation: sets[0]!.variation } : {})),
  };
}

function pointZones(fit: Fit, count: number): Float64Array {
  const k2 = fit.states.length ** 2;
  const { rows } = zonePooling(fit);
  const data = new Float64Array(rows.length * count * k2);
  rows.forEach((p, z) => { for (let d = 0; d < count; d++) data.set(p, (z * count + d) * k2); });
  return data;
}

function posteriorZones(fit: Fit, count: number, random: RandomStream): Float64Array {
  const zones = fit.zones!.zones;
  return zoneRowDraws(zones.map((z) => z.fit.counts), fitMask(fit), fitPrior(fit), fit.states.length, count, random,
    zones.map((z) => z.fit.gapCounts ?? [])).data;
}

/**
 * The partial-pooling posterior from the zones' one-step counts (k×k each), the structural zeros
 * and the prior (k×k): `data[(z*count + d)*k² + i*k + j]`, and per row the κ of each draw (null for a
 * row with one possible cell). Draw d takes sample s = d mod VARIATION_SAMPLES of the row's (κ, p)
 * and every zone's row from Dirichlet(κp + c_z), c_z the zone's counts in that sample.
 *
 * The samples come from sampleZonePosterior (zone-posterior.ts: its chains one after another).
 * Without pairs further apart than one step (`zoneGaps` absent or empty) c_z is the zone's one-step
 * counts; with gaps, its completed counts of sample s.
 */
export function zoneRowDraws(zoneCounts: readonly Float64Array[], mask: Uint8Array, prior: Float64Array, k: number, count: number,
  random: RandomStream, zoneGaps: readonly (readonly GapCell[])[] = []): { data: Float64Array; kappa: (Float64Array | null)[] } {
  const k2 = k * k;
  const Z = zoneCounts.length;
  const posterior = sampleZonePosterior(zoneCounts, mask, prior, k, random, zoneGaps);
  const samples = posterior.rows;
  const total = posterior.settings.chains * posterior.settings.kept;
  const countsOf = (s: number, z: number): Float64Array =>
    posterior.completed ? posterior.completed.subarray((s * Z + z) * k2, (s * Z + z + 1) * k2) : zoneCounts[z]!;
  const rows = samples.map((r, i) => ({ cells: possibleCells(mask, k, i), samples: r }));
  const data = new Float64Array(Z * count * k2);
  const a = new Float64Array(k);
  for (let b = 0; b < blockCount(count); b++) {
    const stream = random.stream(blockName(b)).stream('zones');
    for (let d = b * DRAW_BLOCK; d < Math.min(count, (b + 1) * DRAW_BLOCK); d++) {
      const s = d % total;
      for (let z = 0; z < Z; z++) {
        const n = countsOf(s, z);
        for (let i = 0; i < k; i++) {
          const { cells, samples } = rows[i]!;
          const at = (z * count + d) * k2 + i * k;
          if (!samples) { data[at + cells[0]!] = 1; continue; }
          a.fill(0);
          const m = cells.length;
          const kappa = samples.kappa[s]!;
          for (let c = 0; c < m; c++) a[cells[c]!] = kappa * samples.mean[s * m + c]! + n[i * k + cells[c]!]!;
          sampleDirichlet(stream, a, 0, k, data, at);
        }
      }
    }
  }
  const kappa = rows.map(({ samples }) => (samples ? Float64Array.from({ length: count }, (_, d) => samples.kappa[d % total]!) : null));
  return { data, kappa };
}

/**
 * The partial-pooling sampler of a zoned fit run as a forecast runs it, kept for its diagnostics
 * (fit/zone-sampler.ts): what `sere fit` and `sere check` report, on `random` (their seed).
 */
export function zoneSamplerRun(fit: Fit, random: RandomStream, settings?: ZoneChainSettings, threads?: number): ZoneSamplerRun {
  const zones = fit.zones!.zones;
  const k = fit.states.length;
  const counts = zones.map((z) => z.fit.counts);
  const mask = fitMask(fit);
  const posterior = sampleZonePosterior(counts, mask, fitPrior(fit), k, random, zones.map((z) => z.fit.gapCounts ?? []), settings, threads);
  return zonePosteriorDiagnostics(posterior, counts, mask, k, random.seed);
}
