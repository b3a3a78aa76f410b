import type { Scenario } from '../scenario/scenario.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import { keyOf, type RandomStream } from '../uncertainty/random.js';
import { eventHits } from './event-hits.js';
import { buildPlan, type RunPlan } from './plan.js';
import { carriedStarts } from './carried-start.js';
import { plotCounts, plotCountsBuffer, type PlotCounts, type PlotJob } from './plot-counts.js';
import { projectionState, type ProjectionInputs, type ProjectionState } from './project-chunk.js';
import type { SharedRun } from './engine-tasks.js';
import { makePool } from './thread-pool.js';
import { threadsFor } from './threads.js';
import { chunksOf, yearsPerChunk } from './chunk-years.js';
import { blockCount, blockName, sharedFloat64 } from '../uncertainty/draw-blocks.js';
import { appendBand, emptyBands, type ShareBands } from './year-bands.js';
import { yearStreamKeys } from './year-matrix.js';

/** Per draw, what a run keeps of its whole length: the first times (no mixes; see ProjectionState). */
export interface Tracks {
  readonly draws: number;
  readonly horizon: number;
  readonly k: number;
  /** The steps summarised, increasing. */
  readonly recorded: readonly number[];
  readonly firstAtTarget: Int32Array;
  readonly targetRunAtHorizon: Int32Array;
  readonly firstMostCommon: Int32Array;
}

export interface Simulation {
  readonly tracks: Tracks;
  /** Per state: bands of the share over draws at each of `tracks.recorded`. */
  readonly shares: ShareBands[];
  /** Every draw's mix at the horizon, `[s*D + d]`: for the uncertainty split and comparisons. */
  readonly horizonShares: Float64Array;
  readonly plots?: PlotCounts;
  readonly notes: readonly string[];
  /** Threads the run took (threads.ts): what the summaries after it may use, its workers already started. */
  readonly threads: number;
}

/** What to switch off, to see how much of the band each source of uncertainty makes (see uncertainty-split.ts). */
export interface Switches {
  /** Landscape events at their expected effect every year instead of random years. */
  readonly expectedEvents?: boolean;
  /** Shares only, no plot counts. */
  readonly noPlots?: boolean;
}

export interface SimulateOptions {
  readonly switches?: Switches;
  readonly onProgress?: (done: number, total: number) => void;
  /** Steps to summarise (default: every step 0 … horizon). Every step is run either way. */
  readonly record?: readonly number[];
  /** Memory for a chunk of years of every scenario's mixes (default CHUNK_BYTES, chunk-years.ts). */
  readonly chunkBytes?: number;
  /** Threads to use (threads.ts); the results are the same for any number. */
  readonly threads?: number;
  /**
   * Heard at each recorded step, in order, with every scenario's mixes of that step (`[s*D + d]`;
   * valid during the call only): for summaries that pair the scenarios draw by draw (compare.ts).
   */
  readonly onYear?: (step: number, mixes: readonly Float64Array[]) => void;
}

/**
 * Multiply-adds one gamma variate of a year matrix costs: measured with `npm run bench -- variation`,
 * 100,000 draws × 100 years × 10 states took 2.7 s without year matrices (2.7 ns a multiply-add)
 * and about 40 times that with them (~100 ns a variate on a loaded machine; ~60 ns alone).
 */
export const VARIATION_WORK = 30;

/**
 * Multiply-adds' time a draw's plots cost per step and matrix cell (k² a step), when plots are
 * counted: measured on 5,000 plots of 6 states (`npm run bench -- plots`), about 3 s for
 * 4,000 draws × 30 steps on one loaded core — some 25 µs a draw and step, against 36 multiply-adds
 * of ~2.7 ns for the shares. A rough figure: it only decides whether worker threads pay.
 */
export const PLOT_WORK = 300;

/** Run one scenario on given matrix draws (see simulateTogether). */
export function simulate(scenario: Scenario, matrices: MatrixDraws, random: RandomStream, options: SimulateOptions = {}): Simulation {
  return simulateTogether([scenario], matrices, random, options)[0]!;
}

/**
 * Run scenarios side by side on the same matrix draws, a chunk of years at a time: every draw's
 * current mix is kept, and only a chunk of years of mixes (as many as `chunkBytes` holds); each
 * year of a chunk is summarised — bands, the horizon's mixes, `onYear` — before the next chunk is
 * run, so memory does not grow with the horizon. Each draw's arithmetic is the same whatever the
 * chunks, so the results do not depend on the budget.
 *
 * Random event years and plot noise come from streams named after the event and 'plots',
 * sub-streams of `random`, so every alternative run on the same draws with the same seed meets the
 * same storms and the same plot-level chance. Treatments must already have been checked on the
 * fitted matrix (checkScenarios: runForecast and runComparison do it once, not on every rerun the
 * uncertainty split or the effort grid makes). The scenarios must share horizon and level.
 */
export function simulateTogether(scenarios: readonly Scenario[], matrices: MatrixDraws, random: RandomStream,
  options: SimulateOptions = {}): Simulation[] {
  const { switches = {}, onProgress } = options;
  const D = matrices.count;
  const { k } = matrices;
  const H = scenarios[0]!.horizonSteps;
  const steps = H + 1;
  const recorded = options.record ? [...options.record] : Array.from({ length: steps }, (_, t) => t);
  // Year matrices come from streams named after the block and step, shared by the alternatives (common random numbers).
  const variation = matrices.concentration
    ? { concentration: matrices.concentration, keys: yearStreamKeys(random.stream('years'), D, H) }
    : undefined;
  // Alternatives that share an event (its name and chances) share its years: drawn once, not per run.
  const hitsByEvent = new Map<string, Uint8Array>();
  const runs = scenarios.map((scenario) => prepare(scenario, matrices, random, switches, variation, hitsByEvent));
  // Kept: the recorded steps and the horizon, whose mixes every run keeps.
  const kept = [...new Set([...recorded, H])].sort((a, b) => a - b);
  const isRecorded = new Uint8Array(steps);
  for (const t of recorded) isRecorded[t] = 1;
  const perChunk = Math.min(kept.length, yearsPerChunk(D, k, scenarios.length, options.chunkBytes));
  const shared: SharedRun[] = runs.map((run) => ({
    inputs: run.inputs, state: run.state, outcomes: run.outcomes, level: run.scenario.level, buffer: sharedFloat64(perChunk * k * D),
  }));
  // A year matrix costs a gamma variate per cell, about VARIATION_WORK multiply-adds' time: count it
  // as that much work when deciding whether worker threads pay for their start — once per zone, as
  // the runs share each draw's year matrices (project-chunk.ts); each run projects one mix per
  // sub-population (a zone, or a treated part of one: plan.ts); plot counts PLOT_WORK per run with
  // plots. (Counting one mix per run, the zoned demo — 3 zones, a treated part — looked like a third
  // of its work and ran on one thread.)
  const plotRuns = switches.noPlots ? 0 : scenarios.filter((s) => s.plots).length;
  const mixes = runs.reduce((n, run) => n + run.plan.subPopulations.length, 0);
  const yearWork = variation ? VARIATION_WORK * (matrices.zones ?? 1) : 0;
  const threads = threadsFor(options.threads, D, steps * (mixes + yearWork + plotRuns * PLOT_WORK), k, 1);
  const pool = makePool(threads);
  pool.start(shared);
  const slotOf = new Int32Array(steps);
  const shares = runs.map(() => Array.from({ length: k }, emptyBands));
  const horizonShares = runs.map(() => new Float64Array(k * D));
  const total = D * runs.length;
  let work = 0;
  for (const chunk of chunksOf(kept, H, perChunk)) {
    slotOf.fill(-1);
    chunk.kept.forEach((t, r) => { slotOf[t] = r; });
    pool.phase({ kind: 'project', from: chunk.from, to: chunk.to, slotOf });
    work += (chunk.to - chunk.from) * runs.length;
    onProgress?.(Math.floor((total * work) / (steps * runs.length)), total);
    // The bands of every recorded year of the chunk, one task per (run, year): its k states.
    const runSlots: number[] = [];
    chunk.kept.forEach((t, r) => {
      if (isRecorded[t]) runs.forEach((_, n) => { runSlots.push(n, r); });
    });
    const results = sharedFloat64((runSlots.length / 2) * k * 4);
    pool.phase({ kind: 'bands', runSlots: Int32Array.from(runSlots), results });
    for (let y = 0; y < runSlots.length / 2; y++) {
      for (let s = 0; s < k; s++) {
        const c = y * k + s;
        const band = { median: results[4 * c]!, low: results[4 * c + 1]!, high: results[4 * c + 2]! };
        appendBand(shares[runSlots[2 * y]!]![s]!, band, results[4 * c + 3]!);
      }
    }
    chunk.kept.forEach((t, r) => {
      const mixes = shared.map((run) => run.buffer.subarray(r * k * D, (r + 1) * k * D));
      if (t === H) runs.forEach((_, n) => horizonShares[n]!.set(mixes[n]!));
      if (isRecorded[t]) options.onYear?.(t, mixes);
    });
  }
  return runs.map((run, n) => {
    const { firstAtTarget, targetRunAtHorizon, firstMostCommon } = run.state;
    const notes = [...matrices.notes];
    // A treatment whose years all fall outside the forecast is kept (a workspace's scenario may
    // outlive its treatment as seasons move the start on) but said, so it is not read as acting.
    for (const t of run.plan.treatments) {
      if (t.weights.every((w) => w === 0)) notes.push(`treatment '${t.name}' acts in no year of this forecast (its years lie outside it)`);
    }
    if (run.scenario.plots?.scale === 'recorded' && !matrices.emissions) {
      notes.push('plots as recorded: no error table, so the records are taken as the truth and the plot counts are those of the true states');
    }
    run.plan.treatments.forEach((treatment, tr) => {
      let draws = 0;
      for (let d = 0; d < D; d++) draws += run.outcomes[tr * D + d]!;
      if (draws > 0) {
        notes.push(`treatment '${treatment.name}' could not act as written in ${draws} of ${D} draws ` +
          '(probabilities capped at 1, or nothing left to rescale)');
      }
    });
    // Plot counts, block by block on the pool's threads: each block's chance is its own stream's.
    let plots: PlotCounts | undefined;
    if (run.scenario.plots && !switches.noPlots) {
      const job: PlotJob = {
        P: matrices.data, k, draws: D, plan: run.plan, start: run.scenario.plots.start, record: recorded, hits: run.inputs.hits,
        ...(variation ? { variation } : {}), keys: blockKeys(random.stream('plots'), D), counts: plotCountsBuffer(D, recorded.length, k),
        ...plotScaleInputs(run.scenario, matrices, random),
      };
      pool.phase({ kind: 'plots', job });
      plots = plotCounts(job);
    }
    return {
      tracks: { draws: D, horizon: H, k, recorded, firstAtTarget, targetRunAtHorizon, firstMostCommon },
      shares: shares[n]!, horizonShares: horizonShares[n]!, plots, notes, threads,
    };
  });
}

interface Prepared {
  readonly scenario: Scenario;
  readonly plan: RunPlan;
  readonly inputs: Omit<ProjectionInputs, 'onOutcome'>;
  readonly state: ProjectionState;
  /** `outcomes[treatment*D + d]` = 1 when the treatment could not act as written in draw d. */
  readonly outcomes: Uint8Array;
}

function prepare(scenario: Scenario, matrices: MatrixDraws, random: RandomStream, switches: Switches,
  variation: ProjectionInputs['variation'], hitsByEvent: Map<string, Uint8Array>): Prepared {
  const runScenario = switches.expectedEvents
    ? { ...scenario, events: scenario.events.map((e) => ({ ...e, scope: 'site' as const })) }
    : scenario;
  const plan = buildPlan(runScenario);
  const D = matrices.count;
  const H = scenario.horizonSteps;
  // An event's years depend only on its stream (named after it) and its chances (eventHits), read-only after.
  const hits = plan.landscapeEvents.map((e) => {
    const event = plan.events[e]!;
    const key = JSON.stringify([event.name, Array.from(event.chances)]);
    let drawn = hitsByEvent.get(key);
    if (!drawn) {
      drawn = eventHits(random.stream(`event:${event.name}`), event, D, H);
      hitsByEvent.set(key, drawn);
    }
    return drawn;
  });
  const byDraw = carriedStarts(scenario, matrices);
  const inputs = { P: matrices.data, k: matrices.k, draws: D, horizon: H, start: byDraw ?? Array.from(scenario.zones ? scenario.zones.starts : scenario.start.shares), startByDraw: byDraw !== undefined,
    plan, hits, target: scenario.target, variation };
  const outcomes = new Uint8Array(new SharedArrayBuffer(Math.max(1, plan.treatments.length * D)));
  return { scenario, plan, inputs, state: projectionState(D, matrices.k, plan.subPopulations.length), outcomes };
}

/** Each draw's error matrix m of `observerEmissions` (D × M × k × k), laid out as `emissions` (D × k × k). */
function observerMatrices(matrices: MatrixDraws, m: number): Float64Array {
  const { k, count: D } = matrices;
  const kk = k * k;
  const all = matrices.observerEmissions!;
  const M = all.length / (D * kk);
  const out = sharedFloat64(D * kk);
  for (let d = 0; d < D; d++) out.set(all.subarray((d * M + m) * kk, (d * M + m + 1) * kk), d * kk);
  return out;
}

/**
 * With observer error, plots start from each draw's true mix (when the start is the latest survey)
 * and, asked `as: recorded`, are recorded through each draw's error matrix on the streams of
 * 'plots:recorded'. Without an error model the records are taken as the truth: nothing is added.
 */
function plotScaleInputs(scenario: Scenario, matrices: MatrixDraws, random: RandomStream): Pick<PlotJob, 'starts' | 'recorded'> {
  const starts = scenario.start.from === 'latest' ? matrices.starts : undefined;
  const observer = scenario.plots?.observer;
  const emissions = scenario.plots?.scale !== 'recorded' ? undefined
    : observer ? observerMatrices(matrices, observer.matrix) : matrices.emissions;
  return {
    ...(starts ? { starts } : {}),
    ...(emissions ? { recorded: { emissions, keys: blockKeys(random.stream('plots:recorded'), matrices.count) } } : {}),
  };
}

/** The keys of `random`'s sub-streams 'block:b', one per block of draws, 8 words each (random.ts keyOf). */
function blockKeys(random: RandomStream, draws: number): Uint32Array {
  const keys = new Uint32Array(blockCount(draws) * 8);
  for (let b = 0; b < blockCount(draws); b++) keys.set(keyOf(random.stream(blockName(b))), b * 8);
  return keys;
}
