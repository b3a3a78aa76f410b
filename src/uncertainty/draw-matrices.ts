import { hasGaps, type Fit } from '../fit/fit.js';
import { bootstrapInto, bootstrapNotes } from './bootstrap.js';
import type { MatrixDraws } from './draws.js';
import { pointDraws } from './point.js';
import { latentSampleOf, posteriorDraws } from './posterior.js';
import { trueShares } from '../chain/latest-mix.js';
import { SereError } from '../errors.js';
import type { RandomStream } from './random.js';
import { blockCount, blockName, DRAW_BLOCK, sharedFloat64 } from './draw-blocks.js';
import { estimateVariation, VARIATION_SAMPLES, type RowVariation, type VariationSpec } from './variation.js';

export type UncertaintySource = MatrixDraws['source'];

/**
 * The one place that picks a sampler by name; every sampler returns the same flat shape. Draws
 * are made in blocks of DRAW_BLOCK, block b from `random.stream('block:b')` (draw-blocks.ts), into
 * shared memory the engine's threads read.
 */
export function drawMatrices(fit: Fit, source: UncertaintySource, count: number, random: RandomStream,
  variation: VariationSpec = { kind: 'none' }): MatrixDraws {
  return withVariation(fit, drawSource(fit, source, count, random), variation, random);
}

/** Said when sites have positions but the draws take them as independent (README, "Site positions"). */
const POSITIONS_UNUSED = 'the sites have positions, but only uncertainty.source: bootstrap uses them (spatial blocks): ' +
  'these posterior draws take every site as independent, so where neighbouring sites change together the bands are too narrow';

function drawSource(fit: Fit, source: UncertaintySource, count: number, random: RandomStream): MatrixDraws {
  const k = fit.states.length;
  const data = sharedFloat64(count * k * k);
  if (source === 'point') {
    data.set(pointDraws(fit, count).data);
    return { k, count, data, source, notes: [], ...(fit.errorModel ? meanTrueStarts(fit, count, random) : {}) };
  }
  if (source === 'bootstrap' && fit.errorModel) {
    throw new SereError('BAD_OPTION', 'the site bootstrap does not model observer error', { path: 'source' },
      'use source: posterior (the default) with an error matrix');
  }
  let emptyRows = 0;
  // With gaps, one sampler run (or the fit's stored one) serves every block.
  const latent = source === 'posterior' ? latentSampleOf(fit, random) : undefined;
  const starts = latent?.errors ? sharedFloat64(count * k) : undefined;
  const emissions = latent?.errors ? sharedFloat64(count * k * k) : undefined;
  const observers = latent?.errors?.observers ? fit.errorModel?.observers?.names : undefined;
  const m = observers ? 1 + observers.length : 0;
  const observerEmissions = observers ? sharedFloat64(count * m * k * k) : undefined;
  for (let b = 0; b < blockCount(count); b++) {
    const first = b * DRAW_BLOCK;
    const n = Math.min(DRAW_BLOCK, count - first);
    const stream = random.stream(blockName(b));
    if (source === 'bootstrap') emptyRows += bootstrapInto(fit, n, stream, data, first * k * k);
    else {
      const block = posteriorDraws(fit, n, stream, latent);
      data.set(block.data, first * k * k);
      if (starts && block.starts) starts.set(block.starts, first * k);
      if (emissions && block.emissions) emissions.set(block.emissions, first * k * k);
      if (observerEmissions && block.observerEmissions) observerEmissions.set(block.observerEmissions, first * m * k * k);
    }
  }
  const notes = source === 'bootstrap' ? bootstrapNotes(fit, emptyRows) : fit.spatial ? [POSITIONS_UNUSED] : [];
  return { k, count, data, source, notes, ...(starts ? { starts } : {}), ...(emissions ? { emissions } : {}),
    ...(observerEmissions ? { observerEmissions, observers } : {}) };
}

/**
 * A point forecast with observer error starts every draw from the posterior mean true mix at the
 * latest time, and records plots through the posterior mean error matrix.
 */
function meanTrueStarts(fit: Fit, count: number, random: RandomStream): Pick<MatrixDraws, 'starts' | 'emissions' | 'observerEmissions' | 'observers'> {
  const k = fit.states.length;
  const kk = k * k;
  const latent = latentSampleOf(fit, random)!;
  const errors = latent.errors!;
  const observers = errors.observers ? fit.errorModel?.observers?.names : undefined;
  const m = observers ? 1 + observers.length : 1;
  const mean = new Float64Array(k);
  // Every error matrix's posterior mean: the pooled one, then each assessed observer's.
  const meanE = new Float64Array(m * kk);
  const shares = new Float64Array(k);
  for (let r = 0; r < latent.retained; r++) {
    trueShares(errors.latest, r, k, shares, 0);
    for (let x = 0; x < k; x++) mean[x] += shares[x]! / latent.retained;
    for (let c = 0; c < kk; c++) meanE[c] += errors.emissions[r * kk + c]! / latent.retained;
    for (let c = kk; c < m * kk; c++) meanE[c] += errors.observers!.emissions[r * (m - 1) * kk + c - kk]! / latent.retained;
  }
  const starts = sharedFloat64(count * k);
  const emissions = sharedFloat64(count * kk);
  const observerEmissions = observers ? sharedFloat64(count * m * kk) : undefined;
  for (let d = 0; d < count; d++) {
    starts.set(mean, d * k);
    emissions.set(meanE.subarray(0, kk), d * kk);
    observerEmissions?.set(meanE, d * m * kk);
  }
  return { starts, emissions, ...(observerEmissions ? { observerEmissions, observers } : {}) };
}

/**
 * Attach each draw's concentrations. Estimated from the record (sub-stream `variation`), each draw
 * d takes posterior sample d mod VARIATION_SAMPLES of every estimated row: κ and, for posterior
 * draws, the mean row sampled with it — the mean row's posterior under the hierarchical model, wider
 * than the Dirichlet of pooled counts when years differ (periods' transitions are then not
 * independent). Bootstrap draws keep their rows; point draws take each row's posterior median κ.
 * With no row varying, the draws are returned unchanged (today's chain, the same bytes).
 * `keepMeanRows`: take κ alone and leave the drawn rows as they are (zones' rows, zone-draws.ts).
 */
export function withVariation(fit: Fit, draws: MatrixDraws, spec: VariationSpec, random: RandomStream, keepMeanRows = false): MatrixDraws {
  if (spec.kind === 'none') return draws;
  // Estimated from recorded changes year by year, it would take mislabellings for yearly swings.
  if (spec.kind === 'estimated' && fit.errorModel) {
    return { ...draws, notes: [...draws.notes, 'year-to-year variation is not estimated with observer error (recorded yearly changes mix errors with real swings): give it per state, or set variation: none'] };
  }
  const { k, count } = draws;
  const concentration = sharedFloat64(count * k).fill(Infinity);
  let rows: RowVariation[];
  if (spec.kind === 'given') {
    rows = fit.states.map((_, i) => ({ state: i, status: 'given' as const,
      kappa: new Float64Array(0), mean: new Float64Array(0), informativePeriods: 0 }));
    for (let d = 0; d < count; d++) concentration.set(spec.concentration, d * k);
  } else {
    rows = estimateVariation(fit, random.stream('variation'));
    // The hierarchical mean rows rest on one-step periods only; with pairs further apart, the gap
    // model's posterior rows use every pair, so they are kept and only κ is taken (the mean rows'
    // extra width under year-to-year variation is then left out: README, year-to-year variation).
    const meanRows = draws.source === 'posterior' && !hasGaps(fit) && !keepMeanRows;
    for (const row of rows) {
      if (row.status !== 'estimated') continue;
      const i = row.state;
      const median = draws.source === 'point' ? Array.from(row.kappa).sort((a, b) => a - b)[VARIATION_SAMPLES >> 1]! : 0;
      for (let d = 0; d < count; d++) {
        const s = d % VARIATION_SAMPLES;
        concentration[d * k + i] = draws.source === 'point' ? median : row.kappa[s]!;
        if (meanRows) draws.data.set(row.mean.subarray(s * k, (s + 1) * k), d * k * k + i * k);
      }
    }
  }
  if (concentration.every((c) => c === Infinity)) return { ...draws, variation: rows };
  return { ...draws, concentration, variation: rows };
}
