import type { RunPlan } from './plan.js';
import { fillPlanMatrices, fillRecipe, planWorkspace } from './plan-matrices.js';
import type { ProjectionInputs } from './project-chunk.js';
import { startYearStreams } from './year-matrix.js';
import { yearKernel } from '../uncertainty/year-kernel.js';
import type { DrawLayout } from './layout.js';
import { DRAW_BLOCK } from '../uncertainty/draw-blocks.js';
import { largestRemainder } from '../scenario/largest-remainder.js';

export interface PlotCounts extends DrawLayout {
  readonly recorded: readonly number[];
  /** Number of plots, layout [recorded step][state][draw] (see layout.ts). */
  readonly counts: Int32Array;
}

/**
 * Everything the plot simulation of a run reads, as numbers and shared arrays, so any thread can
 * run any block of its draws (engine-tasks.ts): the chance of block b comes from the stream whose
 * key is `keys[b*8 … b*8 + 8)` (random.ts keyOf), and `counts` is shared memory each block writes
 * its own draws of.
 */
export interface PlotJob {
  readonly P: Float64Array;
  readonly k: number;
  readonly draws: number;
  readonly plan: RunPlan;
  readonly start: readonly number[];
  readonly record: readonly number[];
  readonly hits: readonly Uint8Array[];
  /** Year-to-year variation: the same year matrices as the shares' run (the same streams, taken in the same order). */
  readonly variation?: ProjectionInputs['variation'];
  /** The plot-level chance of each block of draws: its own sub-stream's key (draw-blocks.ts). */
  readonly keys: Uint32Array;
  /** With observer error and a start at the latest survey: each draw's true starting mix (D × k); its plots are split by it. */
  readonly starts?: Float64Array;
  /**
   * Counts "as recorded": each draw's error matrix E (D × k × k, row = true, column = recorded) and
   * the keys of the chance of recording per block (sub-streams of their own, so the true plots are
   * the same draws as without it). Absent: the counts are of the true states.
   */
  readonly recorded?: { readonly emissions: Float64Array; readonly keys: Uint32Array };
  /** Number of plots, layout [recorded step][state][draw] (see layout.ts), in shared memory. */
  readonly counts: Int32Array;
}

/** The result of a job whose every block has run. */
export function plotCounts(job: PlotJob): PlotCounts {
  return { draws: job.draws, slots: job.record.length, k: job.k, recorded: job.record, counts: job.counts };
}

/** Shared memory for a job's counts: D × recorded steps × k. */
export function plotCountsBuffer(draws: number, recorded: number, k: number): Int32Array {
  return new Int32Array(new SharedArrayBuffer(Math.max(1, draws * recorded * k) * 4));
}

/**
 * Number of plots in each state, simulated plot by plot in aggregate: each step, the plots in
 * state i move on as Multinomial(nᵢ, row i of the year's matrix), and a landscape event moves every
 * plot by its row of the event matrix. Block b of draws takes its chance from its own sub-stream,
 * so blocks run on any thread in any order give the same counts. This adds the chance of
 * individual plots (process noise) to the uncertainty about the matrix, so the bands are
 * prediction bands for "how many of our N plots". Plots are placed in the partial-area parcels at
 * random at the start of each draw. Runs block `b` of `job`'s draws.
 *
 * The multinomials are drawn in WebAssembly, in the year kernel's module and memory (`moveRows`,
 * `multinomial`; assembly/year-kernel.ts), the numbers of multinomial.ts on the same streams bit for
 * bit (test/uncertainty/plot-kernel.test.ts), so the year matrix is read where the kernel draws it.
 * Measured (`npm run bench -- plot-kernel`, one step of 5,000 plots in 6 states, 2 shared cores at
 * load 8–10): 4.1–4.2 µs of CPU in JavaScript, 3.6–4.1 µs here — only 1.0–1.15×: the time is the
 * binomials' own arithmetic (BTPE near its lower bound n·p = 10 accepts through the pmf recurrence,
 * a division per step; inversion searches ~n·p steps) and the host's exp, log and log1p, which the
 * kernel must call for the same bits (with AssemblyScript's own, 1.3×, and every count would move).
 * The uncertainty split reruns this for its 'matrix' and 'variation' sources: with the matrix at its
 * MLE or the year matrices off every draw's plots move by other matrices, so the run's counts cannot
 * stand in, and measuring those reruns in shares would change what their widths mean (plots,
 * against the full run's plots); its 'plots' source reuses the run (uncertainty-split.ts).
 */
export function simulatePlotBlock(job: PlotJob, b: number): void {
  const { k, draws: D, P, plan, start, record, hits, variation } = job;
  const d0 = b * DRAW_BLOCK;
  const d1 = Math.min(D, d0 + DRAW_BLOCK);
  const k2 = k * k;
  const horizon = plan.horizon;
  const steps = horizon + 1;
  const built = new Int32Array(plan.plans.length);
  const slotOf = new Int32Array(steps).fill(-1);
  record.forEach((t, r) => { slotOf[t] = r; });
  const { counts } = job;
  const G = plan.subPopulations.length;
  const R = plan.plans.length;
  const landscape = plan.landscapeEvents.map((e) => plan.events[e]!.matrix);
  const through = job.recorded;

  // The kernel's own doubles: the recipes' matrices (written there by fillRecipe), the draw's matrix
  // (no variation, no plan), the landscape events', the draw's error matrix, the groups' weights.
  const recipesAt = 0;
  const drawAt = R * k2;
  const eventsAt = drawAt + k2;
  const emissionAt = eventsAt + landscape.length * k2;
  const weightsAt = emissionAt + k2;
  // Its counts: the plots now and next per group (G × k each), an event's moved plots, a state's split over groups, the true plots.
  let nowAt = 0;
  let nextAt = G * k;
  const movedAt = 2 * G * k;
  const splitAt = movedAt + k;
  const trueAt = splitAt + G;
  const seenAt = trueAt + k;
  // Streams: the year matrices' at their steps 1 … horizon, then the plots' and the recording's.
  const plotStream = steps;
  const recordingStream = steps + 1;
  const kernel = yearKernel(k, steps + 2, 1, { matrices: weightsAt + G, counts: seenAt + k });
  const { matrices, counts: plots } = kernel;
  const year = kernel.years;
  landscape.forEach((m, e) => matrices.set(m, eventsAt + e * k2));
  plan.subPopulations.forEach((g, n) => { matrices[weightsAt + n] = g.weight; });
  const ws = { ...planWorkspace(plan), matrices: matrices.subarray(recipesAt, recipesAt + R * k2) };

  const total = start.reduce((a, c) => a + c, 0);
  kernel.startStream(plotStream, job.keys, b * 8);
  if (through) kernel.startStream(recordingStream, through.keys, b * 8);
  if (variation) startYearStreams(kernel, variation.keys, b, horizon, 0, steps);
  for (let d = d0; d < d1; d++) {
    const first = job.starts ? largestRemainder(Array.from(job.starts.subarray(d * k, (d + 1) * k)), total) : start;
    if (variation) kernel.setDraw(0, P, d * k2, variation.concentration, d * k);
    if (!plan.trivial && !variation) fillPlanMatrices(plan, P, d * k2, ws);
    if (plan.trivial && !variation) matrices.set(P.subarray(d * k2, (d + 1) * k2), drawAt);
    if (through) matrices.set(through.emissions.subarray(d * k2, (d + 1) * k2), emissionAt);
    built.fill(-1);
    plots.fill(0, nowAt, nowAt + G * k);
    for (let s = 0; s < k; s++) {
      plots.fill(0, splitAt, splitAt + G);
      kernel.multinomial(plotStream, first[s]!, matrices, weightsAt, G, splitAt);
      for (let g = 0; g < G; g++) plots[nowAt + g * k + s] = plots[splitAt + g]!;
    }
    for (let t = 0; t < steps; t++) {
      if (t > 0) {
        plots.fill(0, nextAt, nextAt + G * k);
        if (variation) kernel.sample(t, 0);
        for (let g = 0; g < G; g++) {
          const recipe = plan.trivial ? -1 : plan.planOf[t * G + g]!;
          if (variation && recipe >= 0 && built[recipe] !== t) { fillRecipe(plan, recipe, year, 0, ws); built[recipe] = t; }
          const M = plan.trivial && variation ? year : matrices;
          const base = plan.trivial ? (variation ? 0 : drawAt) : recipesAt + recipe * k2;
          kernel.moveRows(plotStream, M, base, nowAt + g * k, nextAt + g * k);
          for (let e = 0; e < landscape.length; e++) {
            if (hits[e]![d * steps + t] === 0) continue;
            plots.fill(0, movedAt, movedAt + k);
            kernel.moveRows(plotStream, matrices, eventsAt + e * k2, nextAt + g * k, movedAt);
            plots.copyWithin(nextAt + g * k, movedAt, movedAt + k);
          }
        }
        const swap = nowAt; nowAt = nextAt; nextAt = swap;
      }
      const slot = slotOf[t]!;
      if (slot < 0) continue;
      const out = slot * k * D + d;
      if (!through) {
        for (let g = 0; g < G; g++) for (let s = 0; s < k; s++) counts[out + s * D] += plots[nowAt + g * k + s]!;
        continue;
      }
      // As recorded: the nₓ plots truly in x are recorded as Multinomial(nₓ, row x of this draw's E),
      // so the recorded mix has mean (true mix)·E — the emission step of the hidden Markov model.
      plots.fill(0, trueAt, trueAt + k);
      for (let g = 0; g < G; g++) for (let x = 0; x < k; x++) plots[trueAt + x] += plots[nowAt + g * k + x]!;
      plots.fill(0, seenAt, seenAt + k);
      kernel.moveRows(recordingStream, matrices, emissionAt, trueAt, seenAt);
      for (let s = 0; s < k; s++) counts[out + s * D] = plots[seenAt + s]!;
    }
  }
}
