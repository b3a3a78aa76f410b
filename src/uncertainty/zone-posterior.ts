import type { GapCell } from '../chain/counts.js';
import { possibleCells, type RowPeriods } from '../chain/row-periods.js';
import { zoneRows } from '../chain/zone-pooling.js';
import type { Diagnostics, ZoneSamplerRun } from '../fit/zone-sampler.js';
import { BURN_IN, KAPPA_PRIOR_SCALE, sampleRowConcentration, type ConcentrationState, type RowConcentrationSamples } from './concentration.js';
import { sampleDirichlet } from './dirichlet.js';
import { convergence } from './mcmc-diagnostics.js';
import { randomStreams, type RandomStream } from './random.js';
import { runOnThreads } from './chain-runner.js';
import { availableParallelism } from 'node:os';
import { VARIATION_SAMPLES } from './variation.js';
import { augmentZonesChain } from './zone-augment.js';

/** How long the partial-pooling sampler runs: chains, sweeps dropped per chain, sweeps kept per chain. */
export interface ZoneChainSettings {
  readonly chains: number;
  readonly warmUp: number;
  readonly kept: number;
  /** Every how many sweeps after the warm-up one is kept. */
  readonly thin: number;
}

/** Chains of the zones' sampler: R̂ compares them (Vehtari et al. 2021 use four). */
export const ZONE_CHAINS = 4;

/**
 * 4 chains × 250 kept, every third sweep: VARIATION_SAMPLES (1,000) samples of (κ, p), as the one
 * chain of 1,000 consecutive sweeps kept before. Warm-up per chain: the slice sampler's BURN_IN
 * (100 sweeps) on one-step counts; with gaps 200 sweeps, the setting the SBC of the gapped zones
 * was measured at (test/slow/zones-gaps-sbc.test.ts). Measured on the zoned demo (seeds 6–13, with
 * and without its gaps): every third sweep gave a smallest bulk ESS of 521–813 and a largest R̂ of
 * 1.006–1.012 over its 100-odd quantities; keeping every sweep gave ESS 269–453 and R̂ up to 1.030,
 * every second 505–668 and up to 1.019. The largest of a hundred R̂s passes 1.01 by a little now and
 * then: a warning the user reads, not an error (the gap sampler's DEFAULT_AUGMENT is alike).
 */
export function zoneChainSettings(augmented: boolean): ZoneChainSettings {
  return { chains: ZONE_CHAINS, warmUp: augmented ? 200 : BURN_IN, kept: VARIATION_SAMPLES / ZONE_CHAINS, thin: 3 };
}

/** The partial-pooling posterior, its chains one after another (sample s = chain·kept + n). */
export interface ZonePosterior {
  readonly settings: ZoneChainSettings;
  /** Per row, the (κ, p) samples over its possible cells (null: a row with one possible cell). */
  readonly rows: (RowConcentrationSamples | null)[];
  /** With gaps: `completed[(s*Z + z)*k² + i*k + j]`, zone z's completed counts in sample s; else undefined (the one-step counts). */
  readonly completed?: Float64Array;
}

/**
 * Samples of the partial-pooling posterior (Gelman et al. 2013, BDA3 ch. 5) from the zones'
 * one-step counts (k×k each), the structural zeros and the prior, run as `settings.chains`
 * independent chains whose kept sweeps are joined. Without gapped pairs each row's (κ, p) by the
 * slice sampler of concentration.ts; with them by data augmentation over the zones' bridges
 * (zone-augment.ts, all rows together).
 *
 * Chain c runs on `random.stream('zones').stream('chain:c')` (per row `row:i` under it, as the
 * augmentation's `paths` and `rows`), and starts each row away from the others' starts, as R̂
 * wants (Gelman et al. 2013, sec. 11.4: starts spread more than the target): log κ from its prior
 * (κ = κ₀·u/(1 − u), u uniform: the log-logistic's quantile) and the mean row from
 * Dirichlet(α + 1) — near-uniform, far from where the data put it. Both from the chain's `start`
 * stream. A row never left by any zone is sampled all the same (from its prior: its diagnostics say
 * how well the sampler explores the prior).
 *
 * The chains run on `threads` threads (chain-runner.ts runOnThreads, the sampler's workers): the
 * number asked, else every core when the work passes MIN_THREADED_ZONE_WORK, never more than the
 * chains. Each chain writes only its own samples, so any number of threads gives the same bits.
 */
export function sampleZonePosterior(zoneCounts: readonly Float64Array[], mask: Uint8Array, prior: Float64Array, k: number,
  random: RandomStream, zoneGaps: readonly (readonly GapCell[])[] = [], settings?: ZoneChainSettings, threads?: number): ZonePosterior {
  const augmented = zoneGaps.some((g) => g.length > 0);
  const run = settings ?? zoneChainSettings(augmented);
  const Z = zoneCounts.length;
  const total = run.chains * run.kept;
  const shared = (n: number): Float64Array => new Float64Array(new SharedArrayBuffer(n * 8));
  const rows = Array.from({ length: k }, (_, i) => {
    const m = possibleCells(mask, k, i).length;
    return m < 2 ? null : { kappa: shared(total), mean: shared(total * m) };
  });
  const task: ZoneChainTask = {
    zoneCounts, zoneGaps, mask, prior, k, run, seed: random.seed,
    names: Array.from({ length: run.chains }, (_, c) => random.stream('zones').stream(`chain:${c}`).name),
    rows, ...(augmented ? { completed: shared(total * Z * k * k) } : { periods: zoneRows(zoneCounts, mask, k) }),
  };
  runOnThreads(task, zoneThreads(threads, task), (c) => runZoneChain(task, c));
  // Copied out of shared memory: a posterior is plain data (the sample cache packs it).
  const own = (a: Float64Array): Float64Array => Float64Array.from(a);
  return {
    settings: run, rows: rows.map((r) => r && { kappa: own(r.kappa), mean: own(r.mean) }),
    ...(task.completed ? { completed: own(task.completed) } : {}),
  };
}

/**
 * What any thread needs to run a chain of the partial-pooling sampler (runZoneChain), posted to the
 * sampler's workers as it is (chain-runner.ts): the inputs, each chain's stream name, and the
 * samples in shared memory, which chain c writes from sample c·kept on.
 */
export interface ZoneChainTask {
  readonly zoneCounts: readonly Float64Array[];
  readonly zoneGaps: readonly (readonly GapCell[])[];
  readonly mask: Uint8Array;
  readonly prior: Float64Array;
  readonly k: number;
  readonly run: ZoneChainSettings;
  readonly seed: number;
  /** Chain c's stream (`…/zones/chain:c`), rebuilt on any thread as randomStreams(seed).stream(name). */
  readonly names: readonly string[];
  readonly rows: (RowConcentrationSamples | null)[];
  /** With gapped pairs: the completed counts of every sample, `[(s·Z + z)·k² …]`. */
  readonly completed?: Float64Array;
  /** Without them: each row's periods over the zones (zone-pooling.ts zoneRows), which every chain samples. */
  readonly periods?: readonly RowPeriods[];
}

/**
 * Least work (row-sweeps: chains × sweeps × rows × zones) worth starting a sampler worker for when
 * no thread count is asked: the zoned demo's 3 zones × 5 rows took ~0.5 s on one thread without its
 * gapped pairs (51,000 row-sweeps, ~10 µs each) and ~0.85 s with them, against 100–280 ms for a
 * worker to start (chain-runner.ts); half the work must beat that, from about 30,000.
 */
export const MIN_THREADED_ZONE_WORK = 3e4;

function zoneThreads(requested: number | undefined, task: ZoneChainTask): number {
  const { chains, warmUp, kept, thin } = task.run;
  const work = chains * (warmUp + kept * thin) * task.k * task.zoneCounts.length;
  const wanted = requested ?? (work >= MIN_THREADED_ZONE_WORK ? availableParallelism() : 1);
  return Math.max(1, Math.min(wanted, chains));
}

/** Chain c of the partial-pooling sampler, from its starts to its last kept sweep, into the task's samples. */
export function runZoneChain(task: ZoneChainTask, c: number): void {
  const { zoneCounts, zoneGaps, mask, prior, k, run, rows } = task;
  const chain = randomStreams(task.seed).stream(task.names[c]!);
  const cells = Array.from({ length: k }, (_, i) => possibleCells(mask, k, i));
  const starts = chainStarts(cells, prior, k, chain.stream('start'));
  let part: (RowConcentrationSamples | null)[];
  if (task.completed) {
    const a = augmentZonesChain(zoneCounts, zoneGaps, mask, prior, k, run.warmUp, run.kept, run.thin, chain, starts);
    part = a.rows;
    task.completed.set(a.completed, c * run.kept * zoneCounts.length * k * k);
  } else {
    part = task.periods!.map((r, i) => {
      if (r.cells.length < 2) return null;
      const alpha = Array.from(r.cells, (j) => prior[i * k + j]!);
      return sampleRowConcentration(r, alpha, run.kept, chain.stream(`row:${i}`), { burnIn: run.warmUp, thin: run.thin, start: starts[i] });
    });
  }
  part.forEach((p, i) => {
    if (!p) return;
    rows[i]!.kappa.set(p.kappa, c * run.kept);
    rows[i]!.mean.set(p.mean, c * run.kept * cells[i]!.length);
  });
}

function chainStarts(cells: readonly Int32Array[], prior: Float64Array, k: number, random: RandomStream): (ConcentrationState | undefined)[] {
  return cells.map((c, i) => {
    if (c.length < 2) return undefined;
    const u = random.uniform();
    const kappa = KAPPA_PRIOR_SCALE * (u + 1e-12) / (1 - u + 1e-12);
    const alpha = Float64Array.from(c, (j) => prior[i * k + j]! + 1);
    const mean = new Float64Array(c.length);
    sampleDirichlet(random, alpha, 0, c.length, mean, 0);
    // A cell drawn at exactly 0 would put its log-ratio at −∞: floored, the rest renormalised.
    let sum = 0;
    for (let j = 0; j < mean.length; j++) sum += (mean[j] = Math.max(mean[j]!, 1e-9));
    for (let j = 0; j < mean.length; j++) mean[j] /= sum;
    return { kappa, mean };
  });
}

/**
 * Split-R̂ and bulk ESS (mcmc-diagnostics.ts) of every quantity of a zone posterior (fit/zone-sampler.ts
 * says which): per row log κ, the shared cells, and each zone's cell given the sample,
 * (κᵢpᵢⱼ + c_zij)/(κᵢ + C_zi).
 */
export function zonePosteriorDiagnostics(posterior: ZonePosterior, zoneCounts: readonly Float64Array[], mask: Uint8Array, k: number,
  seed: number): ZoneSamplerRun {
  const { chains, kept, warmUp, thin } = posterior.settings;
  const k2 = k * k;
  const Z = zoneCounts.length;
  const kappa = nanDiagnostics(k);
  const shared = nanDiagnostics(k2);
  const zones = nanDiagnostics(Z * k2);
  const set = (d: Diagnostics, at: number, trace: (s: number) => number): void => {
    if (chains < 2 || kept < 4) return;
    const r = convergence(Array.from({ length: chains }, (_, c) => Float64Array.from({ length: kept }, (_, n) => trace(c * kept + n))));
    d.rhat[at] = r.rhat;
    d.ess[at] = r.ess;
  };
  const counts = (s: number, z: number): Float64Array =>
    posterior.completed ? posterior.completed.subarray((s * Z + z) * k2, (s * Z + z + 1) * k2) : zoneCounts[z]!;
  posterior.rows.forEach((r, i) => {
    if (!r) return;
    const cells = possibleCells(mask, k, i);
    const m = cells.length;
    set(kappa, i, (s) => Math.log(r.kappa[s]!));
    cells.forEach((j, c) => {
      set(shared, i * k + j, (s) => r.mean[s * m + c]!);
      for (let z = 0; z < Z; z++) {
        set(zones, z * k2 + i * k + j, (s) => {
          const n = counts(s, z);
          let N = 0;
          for (let d = 0; d < m; d++) N += n[i * k + cells[d]!]!;
          return (r.kappa[s]! * r.mean[s * m + c]! + n[i * k + j]!) / (r.kappa[s]! + N);
        });
      }
    });
  });
  return { seed, chains, warmUp, kept, thin, augmented: posterior.completed !== undefined, kappa, shared, zones };
}

function nanDiagnostics(n: number): Diagnostics {
  return { rhat: new Float64Array(n).fill(Number.NaN), ess: new Float64Array(n).fill(Number.NaN) };
}
