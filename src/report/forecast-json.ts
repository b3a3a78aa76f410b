import { siteCount } from '../fit/fit.js';
import { blocksJson } from '../fit/spatial-blocks.js';
import type { ForecastResult } from '../engine/forecast.js';
import { TOOL_VERSION } from '../version.js';
import { SENSITIVITY_PRIORS } from '../engine/prior-sensitivity.js';

/**
 * The documented JSON of `sere forecast --json`: one entry per scenario, everything keyed by state
 * name, arrays by year. No timestamps, so that the same inputs and seed give byte-identical output.
 */
export function forecastJson(results: readonly ForecastResult[]): object {
  // 2: dominance is a target on a set of states (states, bound, threshold, stays_met replace state
  // and threshold) with already_met, draws and holding chances; timing bands under 50 draws are null.
  return { format: 'sere-forecast', format_version: 2, tool_version: TOOL_VERSION, scenarios: results.map(scenarioJson) };
}

export function scenarioJson(r: ForecastResult): object {
  const { scenario: sc } = r;
  const { fit } = sc;
  const byState = <T>(f: (s: number) => T): Record<string, T> =>
    Object.fromEntries(fit.states.map((name, s) => [name, f(s)]));
  return {
    name: sc.name,
    file: sc.file,
    sha256: sc.sha256,
    data: { file: fit.input.file, sha256: fit.input.sha256, sites: siteCount(fit), transitions: fit.transitions },
    states: fit.states,
    step: fit.step,
    uncertainty: {
      source: sc.source, draws: r.draws, seed: r.seed,
      // Only for a spatial block bootstrap, so other forecasts are written as before.
      ...(sc.source === 'bootstrap' && fit.spatial ? { blocks: blocksJson(fit.spatial, fit.blockSites !== undefined) } : {}),
    },
    level: sc.level,
    start: {
      year: sc.start.year, from: sc.start.from,
      // With observer error: the true start the draws used (their posterior mean), and the records' mix beside it.
      shares: byState((s) => (r.trueStart ?? sc.start.shares)[s]!),
      ...(r.trueStart ? { recorded_shares: byState((s) => fit.latest.shares[s]!) } : {}),
      // Only when some sites were carried forward, so that outputs without them keep their bytes.
      ...(sc.start.carried?.length ? { carried: sc.start.carried.map((c) => ({ state: fit.states[c.state]!, steps: c.steps, sites: c.sites })) } : {}),
    },
    years: r.years,
    shares: byState((s) => r.shares[s]),
    plots: r.plots && sc.plots ? { total: sc.plots.total, scale: sc.plots.scale ?? 'true', observer: sc.plots.observer?.name ?? null, start: byState((s) => sc.plots!.start[s]!), ...byState((s) => r.plots![s]) } : null,
    treatments: sc.treatments.map((t) => ({ name: t.name, state: fit.states[t.row], area: t.area, ...(t.zones ? { zones: t.zones.map((z) => sc.zones!.names[z]) } : {}) })),
    events: sc.events.map((e) => ({ name: e.name, scope: e.scope, ...(e.zones ? { zones: e.zones.map((z) => sc.zones!.names[z]) } : {}) })),
    // Only in a stratified forecast, so that other outputs keep their bytes.
    ...(sc.zones ? { zones: zonesJson(r) } : {}),
    stationary: r.stationary.bands
      ? byState((s) => { const b = r.stationary.bands![s]!; return { median: b.median, low: b.low, high: b.high }; })
      : null,
    stationary_draws: { unique: r.stationary.unique, not_unique: r.stationary.notUnique },
    stationary_observed_rows: r.observedRows && {
      dropped: r.observedRows.dropped.map((s) => fit.states[s]),
      stationary: r.observedRows.bands
        ? Object.fromEntries(fit.states.flatMap((name, s) => (r.observedRows!.dropped.includes(s) ? []
          : [[name, { median: r.observedRows!.bands![s]!.median, low: r.observedRows!.bands![s]!.low, high: r.observedRows!.bands![s]!.high }]])))
        : null,
      unique: r.observedRows.unique,
      not_unique: r.observedRows.notUnique,
      undefined_draws: r.observedRows.undefinedDraws,
    },
    stationary_treated: r.treatedStationary && {
      year: r.treatedStationary.year,
      treatments: r.treatedStationary.treatments.map((n) => sc.treatments[n]!.name),
      definition: 'area-weighted mixture of the sub-populations\' stationary mixes under their horizon-year treated matrices',
      stationary: r.treatedStationary.bands
        ? byState((s) => { const b = r.treatedStationary!.bands![s]!; return { median: b.median, low: b.low, high: b.high }; })
        : null,
      unique: r.treatedStationary.unique,
      not_unique: r.treatedStationary.notUnique,
    },
    prior_sensitivity: {
      priors: SENSITIVITY_PRIORS,
      method: 'posterior-mean',
      horizon_year: r.years[r.years.length - 1],
      states: r.priorSensitivity.map((p) => ({
        state: fit.states[p.reliance.state],
        reason: p.reliance.reason,
        transitions: p.reliance.observed,
        leaving: p.reliance.leaving,
        prior_leaving: p.reliance.priorLeaving,
        horizon: p.horizon,
        long_run: p.longRun,
      })),
    },
    dominance: r.dominance && sc.target
      ? {
        states: sc.target.states.map((s) => fit.states[s]),
        bound: sc.target.bound === 'at-least' ? 'at_least' : 'at_most',
        threshold: sc.target.threshold,
        stays_met: sc.target.staysMet * fit.step,
        already_met: r.dominance.alreadyMet,
        probability: r.dominance.probability,
        draws: r.dominance.draws,
        median: r.dominance.year?.median ?? null,
        low: r.dominance.year?.low ?? null,
        high: r.dominance.year?.high ?? null,
        holds_at_horizon: r.dominance.holdsAtHorizon,
        holds_throughout: r.dominance.holdsThroughout,
        short_at_horizon: r.dominance.shortAtHorizon,
      }
      : null,
    most_common: byState((s) => {
      const m = r.mostCommon[s]!;
      return { probability: m.probability, draws: m.draws, median: m.year?.median ?? null, low: m.year?.low ?? null, high: m.year?.high ?? null };
    }),
    uncertainty_split: r.split
      ? {
        quantity: r.split.quantity,
        width: byState((s) => r.split!.width[s]),
        sources: r.split.sources.map((src) => ({
          source: src.source,
          width_without: byState((s) => src.widthWithout[s]),
          variance_share: byState((s) => src.varianceShare[s]),
        })),
      }
      : null,
    // Present only when some row varies, so a run without variation writes today's bytes.
    ...(r.variation ? {
      variation: byState((s) => {
        const v = r.variation![s]!;
        return { status: v.status, kappa: v.kappa && { median: v.kappa.median, low: v.kappa.low, high: v.kappa.high }, informative_periods: v.informativePeriods };
      }),
    } : {}),
    ...(r.variationByZone ? {
      variation_by_zone: Object.fromEntries(r.variationByZone.map((z) => [z.zone, z.rows && byState((s) => {
        const v = z.rows![s]!;
        return { status: v.status, kappa: v.kappa && { median: v.kappa.median, low: v.kappa.low, high: v.kappa.high }, informative_periods: v.informativePeriods };
      })])),
    } : {}),
    notes: r.notes,
  };
}

/** A stratified forecast's zones: pooling, each zone's share of the area (and area), start and — with --zones — its own bands. */
function zonesJson(r: ForecastResult): object {
  const sc = r.scenario;
  const zones = sc.zones!;
  const { states } = sc.fit;
  const k = states.length;
  return {
    pooling: sc.fit.zones!.pooling,
    column: sc.fit.zones!.column,
    shares_from: zones.from,
    unit: zones.unit ?? null,
    zones: zones.names.map((name, z) => ({
      name,
      share: zones.shares[z],
      area: zones.areas ? zones.areas[z] : null,
      start: Object.fromEntries(states.map((s, i) => [s, zones.starts[z * k + i]])),
      shares: r.zones ? Object.fromEntries(states.map((s, i) => [s, r.zones![z]!.shares[i]])) : null,
    })),
  };
}
