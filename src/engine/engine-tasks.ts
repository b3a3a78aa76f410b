import { blockCount, DRAW_BLOCK } from '../uncertainty/draw-blocks.js';
import { projectDraws, projectDrawsTogether, type ProjectionInputs, type ProjectionState } from './project-chunk.js';
import { bandsInto } from './band-kernel.js';
import { simulatePlotBlock, type PlotJob } from './plot-counts.js';
import { stationaryBlock, stationaryTaskCount, type StationaryJob } from './stationary-tasks.js';

/**
 * The work of a run that threads share (thread-pool.ts), on shared memory only: what a worker
 * receives once per run. Every array here is backed by a SharedArrayBuffer.
 */
export interface SharedRun {
  readonly inputs: Omit<ProjectionInputs, 'onOutcome'>;
  readonly state: ProjectionState;
  /** A chunk of years of mixes, [slot][state][draw]. */
  readonly buffer: Float64Array;
  /** `outcomes[treatment*D + d]` = 1 when the treatment could not act as written in draw d. */
  readonly outcomes: Uint8Array;
  readonly level: number;
}

/** One phase of a run, split into tasks numbered 0 … count − 1 that any thread may take, in any order. */
export type Phase =
  /**
   * Steps from … to − 1 of every block of draws of every run: task = run × blocks + block; with
   * year-to-year variation task = block, all runs together, as they share each draw's year matrices
   * (project-chunk.ts).
   */
  | { readonly kind: 'project'; readonly from: number; readonly to: number; readonly slotOf: Int32Array }
  /**
   * Bands of a year's states, task = one (run, slot) pair of `runSlots`: results [median, low, high,
   * mean] of its k states at `results[4k·task …]`, state by state — one call of the band kernel per
   * task, as a slot's k columns lie end to end.
   */
  | { readonly kind: 'bands'; readonly runSlots: Int32Array; readonly results: Float64Array }
  /** Plot counts of every block of draws of one run (plot-counts.ts): task = block. */
  | { readonly kind: 'plots'; readonly job: PlotJob }
  /** Long-run mixes of every block of draws (stationary-tasks.ts): task = block. */
  | { readonly kind: 'stationary'; readonly job: StationaryJob };

export function taskCount(runs: readonly SharedRun[], phase: Phase): number {
  if (phase.kind === 'plots') return blockCount(phase.job.draws);
  if (phase.kind === 'stationary') return stationaryTaskCount(phase.job);
  return phase.kind === 'project' ? projectGroups(runs) * blockCount(runs[0]!.inputs.draws) : phase.runSlots.length / 2;
}

/** Groups of runs projected together: one (all runs) when they share year matrices, else one per run. */
function projectGroups(runs: readonly SharedRun[]): number {
  return runs[0]!.inputs.variation ? 1 : runs.length;
}


/**
 * Do task `task` of `phase`. Tasks write disjoint parts of shared arrays (a block's draws, a
 * column's band) and read nothing another task of the same phase writes, so the results are the
 * same whichever thread runs which task, and in whatever order.
 */
export function runTask(runs: readonly SharedRun[], phase: Phase, task: number): void {
  if (phase.kind === 'project') {
    const blocks = blockCount(runs[0]!.inputs.draws);
    const group = Math.floor(task / blocks);
    const b = task % blocks;
    const D = runs[0]!.inputs.draws;
    if (projectGroups(runs) !== 1 || runs.length === 1 && !runs[0]!.inputs.variation) {
      const run = runs[group]!;
      const { outcomes } = run;
      projectDraws({ ...run.inputs, onOutcome: (d, treatment) => { outcomes[treatment * D + d] = 1; } },
        run.state, b * DRAW_BLOCK, Math.min(D, (b + 1) * DRAW_BLOCK), phase.from, phase.to, phase.slotOf, run.buffer);
      return;
    }
    const members = runs;
    projectDrawsTogether(members.map((run) => ({
      inputs: { ...run.inputs, onOutcome: (d, treatment) => { run.outcomes[treatment * D + d] = 1; } }, state: run.state, out: run.buffer,
    })), b * DRAW_BLOCK, Math.min(D, (b + 1) * DRAW_BLOCK), phase.from, phase.to, phase.slotOf);
    return;
  }
  if (phase.kind === 'plots') {
    simulatePlotBlock(phase.job, task);
    return;
  }
  if (phase.kind === 'stationary') {
    stationaryBlock(phase.job, task);
    return;
  }
  const { runSlots, results } = phase;
  const run = runs[runSlots[2 * task]!]!;
  const slot = runSlots[2 * task + 1]!;
  const { draws: D, k } = run.inputs;
  bandsInto(run.buffer.subarray(slot * k * D, (slot + 1) * k * D), D, run.level, results, 4 * k * task);
}
