import type { GapCell } from '../chain/counts.js';
import { maxGap } from '../chain/bridges.js';
import { matrixPowers } from '../chain/matrix.js';
import { possibleCells, type RowPeriods } from '../chain/row-periods.js';
import { bridgeScratch, sampleBridges } from './bridge-sampler.js';
import { sampleRowConcentration, type ConcentrationState, type RowConcentrationSamples } from './concentration.js';
import { sampleDirichlet } from './dirichlet.js';
import { multinomialSampler } from './multinomial.js';
import type { RandomStream } from './random.js';

/** Per row, the kept (κ, p) samples (null: a row with one possible cell); per kept sample and zone, the completed counts. */
export interface ZoneAugmentation {
  readonly rows: (RowConcentrationSamples | null)[];
  /** `completed[(s*Z + z)*k² + i*k + j]`: zone z's one-step counts plus its bridges' latent transitions in kept sweep s. */
  readonly completed: Float64Array;
}

/**
 * One chain of the partial-pooling posterior when zones have pairs g ≥ 2 steps apart, by data
 * augmentation (Tanner & Wong 1987), as augment.ts does for one chain: each sweep
 *   1. draws every zone's latent paths given its current matrix θ_z (bridge-sampler.ts: forward
 *      filtering, backward sampling of each gap cell's bridges, Carter & Kohn 1994), giving the
 *      zone's completed one-step counts c_z = n_z + latent;
 *   2. moves each row's shared (κᵢ, pᵢ) by one sweep of the slice sampler of concentration.ts on the
 *      zones' completed counts (the Dirichlet–multinomial likelihood with θ integrated out), from
 *      where the previous sweep left it — a kernel that keeps p(κ, p | c) invariant;
 *   3. draws each zone's row θ_zi from Dirichlet(κᵢpᵢ + c_zi), its exact conditional.
 * Steps 2–3 together keep p(κ, p, θ | c) invariant (the pair is moved by its marginal's kernel, θ then
 * drawn given it), so the sweep targets the joint posterior of (κ, p, θ, paths). The start: each
 * zone's rows from Dirichlet(prior + n_z), its one-step counts alone (as augment.ts starts), and
 * each row's (κ, p) at `start` (zone-posterior.ts spreads the chains' starts).
 *
 * `warmUp` sweeps are dropped, then `kept` sweeps kept, every `thin`-th. Streams of `random` (the
 * chain's own): `row:i` (the slice sampler), `paths` (the bridges), `rows` (the zone rows), each
 * taken once.
 */
export function augmentZonesChain(zoneCounts: readonly Float64Array[], zoneGaps: readonly (readonly GapCell[])[], mask: Uint8Array,
  prior: Float64Array, k: number, warmUp: number, kept: number, thin: number, random: RandomStream,
  start: readonly (ConcentrationState | undefined)[]): ZoneAugmentation {
  const k2 = k * k;
  const Z = zoneCounts.length;
  const rowStreams = Array.from({ length: k }, (_, i) => random.stream(`row:${i}`));
  const multinomial = multinomialSampler(random.stream('paths'));
  const thetaStream = random.stream('rows');
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
  const state: (ConcentrationState | undefined)[] = Array.from({ length: k }, (_, i) => start[i]);
  const rows = cells.map((c) => (c.length < 2 ? null : { kappa: new Float64Array(kept), mean: new Float64Array(kept * c.length) }));
  const keptCounts = new Float64Array(kept * Z * k2);
  const a = new Float64Array(k);

  for (let sweep = 0; sweep < warmUp + kept * thin; sweep++) {
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
    const after = sweep - warmUp + 1;
    if (after <= 0 || after % thin !== 0) continue;
    const s = after / thin - 1;
    for (let i = 0; i < k; i++) {
      const r = rows[i];
      if (!r) continue;
      r.kappa[s] = state[i]!.kappa;
      r.mean.set(state[i]!.mean, s * cells[i]!.length);
    }
    completed.forEach((c, z) => keptCounts.set(c, (s * Z + z) * k2));
  }
  return { rows, completed: keptCounts };
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
