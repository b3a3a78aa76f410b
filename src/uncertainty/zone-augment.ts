import type { GapCell } from '../chain/counts.js';
import { maxGap } from '../chain/bridges.js';
import { matrixPowers } from '../chain/matrix.js';
import { possibleCells, type RowPeriods } from '../chain/row-periods.js';
import { bridgeScratch, sampleBridges } from './bridge-sampler.js';
import { sampleRowConcentration, type ConcentrationState, type RowConcentrationSamples } from './concentration.js';
import { sampleDirichlet } from './dirichlet.js';
import { multinomialSampler } from './multinomial.js';
import type { RandomStream } from './random.js';

/** How long the zones' data augmentation runs: sweeps dropped, then every `thin`-th sweep kept. */
export interface ZoneAugmentSettings {
  readonly warmUp: number;
  readonly thin: number;
}

/**
 * 200 sweeps dropped, then every sweep kept. Measured by the SBC of a zone cell and κ with gaps
 * (test/slow/zones-gaps-sbc.test.ts: four zones, half their pairs two steps apart): ranks uniform
 * at these settings (κ χ² p = 0.60, cell p = 0.66); DEVELOPERS.md has the zoned demo's CPU time.
 */
export const ZONE_AUGMENT: ZoneAugmentSettings = { warmUp: 200, thin: 1 };

/** Per row, the kept (κ, p) samples (null: a row with one possible cell); per kept sample and zone, the completed counts. */
export interface ZoneAugmentation {
  readonly rows: (RowConcentrationSamples | null)[];
  /** `completed[(s*Z + z)*k² + i*k + j]`: zone z's one-step counts plus its bridges' latent transitions in kept sweep s. */
  readonly completed: Float64Array;
}

/**
 * The partial-pooling posterior when zones have pairs g ≥ 2 steps apart, by data augmentation
 * (Tanner & Wong 1987), as augment.ts does for one chain: each sweep
 *   1. draws every zone's latent paths given its current matrix θ_z (bridge-sampler.ts: forward
 *      filtering, backward sampling of each gap cell's bridges, Carter & Kohn 1994), giving the
 *      zone's completed one-step counts c_z = n_z + latent;
 *   2. moves each row's shared (κᵢ, pᵢ) by one sweep of the slice sampler of concentration.ts on the
 *      zones' completed counts (the Dirichlet–multinomial likelihood with θ integrated out), from
 *      where the previous sweep left it — a kernel that keeps p(κ, p | c) invariant;
 *   3. draws each zone's row θ_zi from Dirichlet(κᵢpᵢ + c_zi), its exact conditional.
 * Steps 2–3 together keep p(κ, p, θ | c) invariant (the pair is moved by its marginal's kernel, θ then
 * drawn given it), so the sweep targets the joint posterior of (κ, p, θ, paths). The start: each
 * zone's rows from Dirichlet(prior + n_z), its one-step counts alone (as augment.ts starts).
 *
 * Streams: `zones` / `row:i` (the slice sampler, as without gaps), `zones` / `paths` (the bridges),
 * `zones` / `rows` (the zone rows), each taken once.
 */
export function augmentZones(zoneCounts: readonly Float64Array[], zoneGaps: readonly (readonly GapCell[])[], mask: Uint8Array,
  prior: Float64Array, k: number, samples: number, random: RandomStream, settings: ZoneAugmentSettings = ZONE_AUGMENT): ZoneAugmentation {
  const k2 = k * k;
  const Z = zoneCounts.length;
  const root = random.stream('zones');
  const rowStreams = Array.from({ length: k }, (_, i) => root.stream(`row:${i}`));
  const multinomial = multinomialSampler(root.stream('paths'));
  const thetaStream = root.stream('rows');
  const cells = Array.from({ length: k }, (_, i) => possibleCells(mask, k, i));
  const alpha = cells.map((c, i) => Array.from(c, (j) => prior[i * k + j]!));
  const gaps = zoneGaps.map((g) => maxGap(g));
  const scratch = bridgeScratch(k);

  const theta = zoneCounts.map((n) => {
    const a = Float64Array.from(n, (x, c) => (mask[c] ? 0 : prior[c]! + x));
    const t = new Float64Array(k2);
    for (let i = 0; i < k; i++) sampleDirichlet(thetaStream, a, i * k, k, t, i * k);
    return t;
  });
  const completed = zoneCounts.map(() => new Float64Array(k2));
  const state: (ConcentrationState | undefined)[] = new Array(k).fill(undefined);
  const rows = cells.map((c) => (c.length < 2 ? null : { kappa: new Float64Array(samples), mean: new Float64Array(samples * c.length) }));
  const kept = new Float64Array(samples * Z * k2);
  const a = new Float64Array(k);

  for (let sweep = 0, s = 0; s < samples; sweep++) {
    for (let z = 0; z < Z; z++) {
      completed[z]!.set(zoneCounts[z]!);
      if (gaps[z]! === 0) continue;
      const powers = matrixPowers(theta[z]!, k, gaps[z]!);
      for (const cell of zoneGaps[z]!) sampleBridges(theta[z]!, k, powers, cell, multinomial, completed[z]!, scratch);
    }
    for (let i = 0; i < k; i++) {
      const m = cells[i]!.length;
      if (m < 2) continue;
      const step = sampleRowConcentration(rowOfZones(completed, cells[i]!, k, i), alpha[i]!, 1, rowStreams[i]!, { burnIn: 0, thin: 1, start: state[i] });
      state[i] = { kappa: step.kappa[0]!, mean: step.mean };
      for (let z = 0; z < Z; z++) {
        a.fill(0);
        for (let c = 0; c < m; c++) a[cells[i]![c]!] = step.kappa[0]! * step.mean[c]! + completed[z]![i * k + cells[i]![c]!]!;
        sampleDirichlet(thetaStream, a, 0, k, theta[z]!, i * k);
      }
    }
    const after = sweep - settings.warmUp;
    if (after < 0 || (after + 1) % settings.thin !== 0) continue;
    for (let i = 0; i < k; i++) {
      const r = rows[i];
      if (!r) continue;
      r.kappa[s] = state[i]!.kappa;
      r.mean.set(state[i]!.mean, s * cells[i]!.length);
    }
    completed.forEach((c, z) => kept.set(c, (s * Z + z) * k2));
    s += 1;
  }
  return { rows, completed: kept };
}

/** Row i of the zones' counts as the κ sampler reads it (zone-pooling.ts zoneRows, without the Maps: it runs every sweep). */
function rowOfZones(counts: readonly Float64Array[], cells: Int32Array, k: number, i: number): RowPeriods {
  const m = cells.length;
  const times: number[] = [];
  const dense: number[] = [];
  const totals: number[] = [];
  counts.forEach((n, z) => {
    let total = 0;
    for (let c = 0; c < m; c++) total += n[i * k + cells[c]!]!;
    if (total === 0) return;
    times.push(z);
    totals.push(total);
    for (let c = 0; c < m; c++) dense.push(n[i * k + cells[c]!]!);
  });
  return { row: i, cells, times, counts: Float64Array.from(dense), totals: Float64Array.from(totals) };
}
