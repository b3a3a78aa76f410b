import type { Fit } from '../fit/fit.js';
import type { Scenario } from '../scenario/scenario.js';
import { largestRemainder } from '../scenario/largest-remainder.js';
import { checkScenarios } from '../engine/check-treatments.js';
import { simulate } from '../engine/simulate.js';
import { zoneForecasts } from '../engine/zone-forecast.js';
import { latentSampleOf } from '../uncertainty/posterior.js';
import type { RandomStream } from '../uncertainty/random.js';
import { drawZoneMatrices } from '../uncertainty/zone-draws.js';
import { resurveyedStates } from './resurvey-choice.js';
import { changeError, meanWidths } from './replicate-widths.js';
import { simulateSurveys, type EffortCell, type SurveyEffort } from './survey-effort.js';

/** One zone's part of a cell: the sites it is given each season and its own band widths after them. */
export interface ZoneEffortPart {
  readonly sites: number;
  /** Per state: expected width of the band of the share of the zone's own area at the horizon. */
  readonly widths: readonly number[];
  /** Per state: the Monte Carlo standard error of widths − the zone's current widths (replicate-widths.ts). */
  readonly changeError: readonly number[];
}

export interface ZoneEffortCell extends EffortCell {
  readonly zones: readonly ZoneEffortPart[];
}

export interface ZoneEffort extends SurveyEffort {
  readonly cells: readonly ZoneEffortCell[];
  /** The zones in the fit's order, their share of the area (what the landscape and the sites are split by). */
  readonly names: readonly string[];
  readonly shares: readonly number[];
  /** Per zone, per state: its own band width now. */
  readonly currentZones: readonly (readonly number[])[];
}

/**
 * Survey effort for a stratified scenario (a zoned fit): the preposterior analysis of
 * survey-effort.ts (Raiffa & Schlaifer 1961) with the surveys placed by zone. Each cell's `sites`
 * are split between the zones in proportion to their share of the area (largest remainder,
 * Hamilton's method) — proportional allocation, the stratified sample's usual default (Cochran
 * 1977, §5.5) — and each zone's are chosen from its own latest plots (resurvey-choice.ts). The
 * "truth" of replicate r is one draw of every zone's matrix from the current zoned posterior
 * (for partial pooling, all zones from the same draw of (κ, p)); the simulated transitions are
 * added to each zone's counts, the zoned posterior is drawn again — partial pooling refits κ and
 * the shared rows with them — and the landscape band (zones added up by area, as the forecast
 * does) and each zone's own band are remeasured. A zone's narrowing is the value of resurveying it
 * at that effort; the landscape's is the total, weighted by area through the stratified forecast.
 *
 * As survey-effort.ts: posterior draws whatever the scenario's source, no year-to-year variation,
 * common random numbers between "now" and every cell. Zones with gaps fitted without pooling keep
 * one run of their own gap sampler, reused with the added surveys (the same approximation as the
 * pooled analysis); partial pooling reruns its data augmentation on every refit.
 */
export function zoneSurveyEffort(scenario: Scenario, grid: { sites: readonly number[]; seasons: readonly number[] },
  options: { replicates: number; draws: number; random: RandomStream }): ZoneEffort {
  checkScenarios([scenario]);
  const { fit } = scenario;
  const stratified = scenario.zones!;
  const zones = fit.zones!.zones;
  const k = fit.states.length;
  const k2 = k * k;
  const h = scenario.horizonSteps;
  const latent = zones.map((z) => latentSampleOf(z.fit, options.random.stream(`zone:${z.name}`)));
  const withCounts = (counts: readonly Float64Array[]): Fit => ({
    ...fit,
    zones: {
      ...fit.zones!,
      zones: zones.map((z, n) => ({ name: z.name, fit: { ...z.fit, counts: counts[n]!, ...(latent[n] ? { latentSample: latent[n] } : {}) } })),
    },
  });
  const widthsOf = (counts: readonly Float64Array[], random: RandomStream): { landscape: number[]; zones: number[][] } => {
    const updated = withCounts(counts);
    const run: Scenario = { ...scenario, fit: updated, plots: undefined, variation: { kind: 'none' } };
    const matrices = drawZoneMatrices(updated, 'posterior', options.draws, random.stream('matrices'));
    const width = (band: { high: Float64Array | readonly number[]; low: Float64Array | readonly number[] }): number => band.high[0]! - band.low[0]!;
    const landscape = simulate(run, matrices, random, { record: [h] }).shares.map(width);
    const own = zoneForecasts(run, matrices, random, {}, [h]).map((z) => z.shares.map(width));
    return { landscape, zones: own };
  };
  type Runs = { landscape: number[]; zones: number[][] }[];
  const landscapeOf = (runs: Runs): number[][] => runs.map((r) => r.landscape);
  const zoneOf = (runs: Runs, z: number): number[][] => runs.map((r) => r.zones[z]!);
  const replicates = Array.from({ length: options.replicates }, (_, r) => r);
  const ownCounts = zones.map((z) => z.fit.counts);
  const now = replicates.map((r) => widthsOf(ownCounts, options.random.stream(`bands:${r}`)));
  const current = withCounts(ownCounts);
  const truths = replicates.map((r) => drawZoneMatrices(current, 'posterior', 1, options.random.stream(`truth:${r}`)).data);
  const cells: ZoneEffortCell[] = [];
  for (const sites of grid.sites) {
    const perZone = largestRemainder(Array.from(stratified.shares), sites);
    for (const seasons of grid.seasons) {
      const runs = replicates.map((r) => {
        const random = options.random.stream(`surveys:${sites}:${seasons}:${r}`);
        const counts = zones.map((z, n) => {
          const c = Float64Array.from(z.fit.counts);
          if (perZone[n]! > 0) simulateSurveys(truths[r]!, k, resurveyedStates(z.fit.latest.counts, perZone[n]!, random), seasons, c, random, n * k2);
          return c;
        });
        return widthsOf(counts, options.random.stream(`bands:${r}`));
      });
      cells.push({
        sites, seasons, widths: meanWidths(landscapeOf(runs)), changeError: changeError(landscapeOf(runs), landscapeOf(now)),
        zones: perZone.map((n, z) => ({ sites: n, widths: meanWidths(zoneOf(runs, z)), changeError: changeError(zoneOf(runs, z), zoneOf(now, z)) })),
      });
    }
  }
  return {
    current: meanWidths(landscapeOf(now)), currentZones: zones.map((_, z) => meanWidths(zoneOf(now, z))), cells, replicates: options.replicates,
    names: zones.map((z) => z.name), shares: Array.from(stratified.shares),
  };
}
