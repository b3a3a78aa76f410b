import { multinomialSampler, type Multinomial } from '../uncertainty/multinomial.js';
import { generatorOfKey } from '../uncertainty/random.js';
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
 */
export function simulatePlotBlock(job: PlotJob, b: number): void {
  const { k, draws: D, P, plan, start, record, hits, variation } = job;
  const d0 = b * DRAW_BLOCK;
  const d1 = Math.min(D, d0 + DRAW_BLOCK);
  const k2 = k * k;
  const horizon = plan.horizon;
  const steps = horizon + 1;
  const built = new Int32Array(plan.plans.length);
  const kernel = variation ? yearKernel(k, steps) : undefined;
  /** The year matrix, read where the kernel draws it. */
  const year = kernel ? kernel.years : new Float64Array(0);
  const slotOf = new Int32Array(steps).fill(-1);
  record.forEach((t, r) => { slotOf[t] = r; });
  const { counts } = job;
  const G = plan.subPopulations.length;
  const groupWeights = Float64Array.from(plan.subPopulations, (g) => g.weight);
  const ws = planWorkspace(plan);
  const landscape = plan.landscapeEvents.map((e) => plan.events[e]!.matrix);
  let now = new Int32Array(G * k);
  let next = new Int32Array(G * k);
  const split = new Int32Array(G);
  const moved = new Int32Array(k);

  const through = job.recorded;
  const total = start.reduce((a, c) => a + c, 0);
  const trueAt = new Int32Array(k);
  const seen = new Int32Array(k);
  const multinomial: Multinomial = multinomialSampler(generatorOfKey(job.keys, b * 8));
  const recording: Multinomial | undefined = through && multinomialSampler(generatorOfKey(through.keys, b * 8));
  if (kernel) startYearStreams(kernel, variation!.keys, b, horizon, 0, steps);
  for (let d = d0; d < d1; d++) {
    const first = job.starts ? largestRemainder(Array.from(job.starts.subarray(d * k, (d + 1) * k)), total) : start;
    if (kernel) kernel.setDraw(0, P, d * k2, variation!.concentration, d * k);
    if (!plan.trivial && !variation) fillPlanMatrices(plan, P, d * k2, ws);
    built.fill(-1);
    now.fill(0);
    for (let s = 0; s < k; s++) {
      split.fill(0);
      multinomial(first[s]!, groupWeights, 0, G, split, 0);
      for (let g = 0; g < G; g++) now[g * k + s] = split[g]!;
    }
    for (let t = 0; t < steps; t++) {
      if (t > 0) {
        next.fill(0);
        if (kernel) kernel.sample(t, 0);
        for (let g = 0; g < G; g++) {
          const recipe = plan.trivial ? -1 : plan.planOf[t * G + g]!;
          if (variation && recipe >= 0 && built[recipe] !== t) { fillRecipe(plan, recipe, year, 0, ws); built[recipe] = t; }
          const M = plan.trivial ? (variation ? year : P) : ws.matrices;
          const base = plan.trivial ? (variation ? 0 : d * k2) : recipe * k2;
          for (let i = 0; i < k; i++) {
            const n = now[g * k + i]!;
            if (n > 0) multinomial(n, M, base + i * k, k, next, g * k);
          }
          for (let e = 0; e < landscape.length; e++) {
            if (hits[e]![d * steps + t] === 0) continue;
            moved.fill(0);
            for (let i = 0; i < k; i++) {
              const n = next[g * k + i]!;
              if (n > 0) multinomial(n, landscape[e]!, i * k, k, moved, 0);
            }
            next.set(moved, g * k);
          }
        }
        const swap = now; now = next; next = swap;
      }
      const slot = slotOf[t]!;
      if (slot < 0) continue;
      const out = slot * k * D + d;
      if (!through || !recording) {
        for (let g = 0; g < G; g++) for (let s = 0; s < k; s++) counts[out + s * D] += now[g * k + s]!;
        continue;
      }
      // As recorded: the nₓ plots truly in x are recorded as Multinomial(nₓ, row x of this draw's E),
      // so the recorded mix has mean (true mix)·E — the emission step of the hidden Markov model.
      trueAt.fill(0);
      for (let g = 0; g < G; g++) for (let x = 0; x < k; x++) trueAt[x] += now[g * k + x]!;
      seen.fill(0);
      for (let x = 0; x < k; x++) if (trueAt[x]! > 0) recording(trueAt[x]!, through.emissions, d * k2 + x * k, k, seen, 0);
      for (let s = 0; s < k; s++) counts[out + s * D] = seen[s]!;
    }
  }
}
