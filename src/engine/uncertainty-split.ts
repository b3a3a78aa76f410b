import type { Scenario } from '../scenario/scenario.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import type { RandomStream } from '../uncertainty/random.js';
import { scenarioDraws } from './scenario-draws.js';
import { pointDraws } from '../uncertainty/point.js';
import { sharedFloat64 } from '../uncertainty/draw-blocks.js';
import { cachedSample } from '../uncertainty/sample-cache.js';
import { bandOf } from './quantiles.js';
import { simulate, type Simulation, type Switches } from './simulate.js';
import { drawIndex } from './layout.js';
import type { EngineOptions } from './engine-options.js';

export type UncertaintySourceName = 'matrix' | 'variation' | 'events' | 'plots';

export interface SourceShare {
  readonly source: UncertaintySourceName;
  /** Per state: band width at the horizon with this source switched off. */
  readonly widthWithout: number[];
  /** Per state: 1 − Var(without)/Var(full), the share of the variance this source adds (may overlap). */
  readonly varianceShare: number[];
}

export interface UncertaintySplit {
  /** What the widths measure: share of the area, or share of the plots when plots are counted. */
  readonly quantity: 'area' | 'plots';
  /** Per state: band width at the horizon with every source on. */
  readonly width: number[];
  readonly sources: readonly SourceShare[];
}

/**
 * Where the band at the horizon comes from, found by switching each source of uncertainty off in
 * turn and rerunning on the same random numbers: the fitted matrix (replaced by the MLE — more
 * surveys shrink this part; year-to-year variation is kept), year-to-year variation (every year
 * the drawn matrix itself), landscape events (replaced by their expected effect each year), and
 * plot-level chance (shares instead of counts). Sources interact, so the shares need not add up
 * to 1; they say which source matters, not an exact budget. Only sources present are listed.
 */
export function splitUncertainty(scenario: Scenario, matrices: MatrixDraws, full: Simulation, random: RandomStream,
  engine: EngineOptions = {}): UncertaintySplit | null {
  const present: UncertaintySourceName[] = [];
  if (scenario.source !== 'point') present.push('matrix');
  if (matrices.concentration) present.push('variation');
  if (scenario.events.some((e) => e.scope === 'landscape')) present.push('events');
  if (scenario.plots) present.push('plots');
  if (present.length < 2) return null;
  const quantity = scenario.plots ? 'plots' : 'area';
  const fullStats = horizonStats(full, scenario, quantity === 'plots');
  const sources = present.map((source) => {
    const switches: Switches = { expectedEvents: source === 'events', noPlots: source === 'plots' };
    const draws: MatrixDraws = source === 'matrix' ? { ...pointOf(scenario, matrices.count, random), ...meanErrorParts(matrices), concentration: matrices.concentration }
      : source === 'variation' ? { ...matrices, concentration: undefined } : matrices;
    // Only the horizon is summarised: the reruns keep no other year. Plot counts are drawn after
    // the shares, from their own streams, so with plots off the shares are the full run's to the
    // last bit: that rerun (a whole run, year matrices and all) is not made.
    const off = source === 'plots' ? full
      : simulate(scenario, draws, random, { switches, record: [scenario.horizonSteps], chunkBytes: engine.chunkBytes, threads: engine.threads });
    const stats = horizonStats(off, scenario, quantity === 'plots' && source !== 'plots');
    return {
      source,
      widthWithout: stats.map((s) => s.width),
      varianceShare: stats.map((s, state) => {
        const v = fullStats[state]!.variance;
        return v > 0 ? 1 - s.variance / v : 0;
      }),
    };
  });
  return { quantity, width: fullStats.map((s) => s.width), sources };
}

/** Per state at the horizon: band width and variance over draws, as a share (of area or of plots). */
function horizonStats(sim: Simulation, scenario: Scenario, plots: boolean): { width: number; variance: number }[] {
  const k = scenario.fit.states.length;
  const { draws } = sim.tracks;
  const last = sim.plots ? sim.plots.recorded.indexOf(scenario.horizonSteps) : -1;
  const total = scenario.plots?.total ?? 1;
  return Array.from({ length: k }, (_, s) => {
    const column = new Float64Array(draws);
    for (let d = 0; d < draws; d++) {
      column[d] = plots ? sim.plots!.counts[drawIndex(sim.plots!, d, last, s)]! / total : sim.horizonShares[s * draws + d]!;
    }
    let mean = 0;
    for (const v of column) mean += v / draws;
    let variance = 0;
    for (const v of column) variance += (v - mean) ** 2 / draws;
    const band = bandOf(column, scenario.level);
    return { width: band.high - band.low, variance };
  });
}

/**
 * With observer error the draws also carry each one's true start and error matrices: with the
 * matrix's uncertainty off they are held at their means over the draws (as a point forecast holds
 * them at their posterior means), so the rerun starts from the true mix and records plots "as
 * recorded" through an error matrix, as the full run does.
 */
function meanErrorParts(matrices: MatrixDraws): Partial<Pick<MatrixDraws, 'starts' | 'emissions' | 'observerEmissions' | 'observers'>> {
  const D = matrices.count;
  const meanOf = (per: Float64Array | undefined): Float64Array | undefined => {
    if (!per) return undefined;
    const n = per.length / D;
    const mean = new Float64Array(n);
    for (let d = 0; d < D; d++) for (let c = 0; c < n; c++) mean[c] += per[d * n + c]! / D;
    const out = sharedFloat64(per.length);
    for (let d = 0; d < D; d++) out.set(mean, d * n);
    return out;
  };
  const starts = meanOf(matrices.starts);
  const emissions = meanOf(matrices.emissions);
  const observerEmissions = meanOf(matrices.observerEmissions);
  return { ...(starts ? { starts } : {}), ...(emissions ? { emissions } : {}),
    ...(observerEmissions ? { observerEmissions, observers: matrices.observers } : {}) };
}

/**
 * The fitted matrix alone, every draw: the MLE, or each zone's point estimate for a stratified
 * forecast — through the sample cache, as finding it (gap EM, partial pooling) is fit-time work.
 */
function pointOf(scenario: Scenario, count: number, random: RandomStream): MatrixDraws {
  return scenario.zones ? scenarioDraws({ ...scenario, source: 'point', variation: { kind: 'none' } }, count, random)
    : cachedSample({ draws: 'point', fit: scenario.fit, count }, () => pointDraws(scenario.fit, count));
}
