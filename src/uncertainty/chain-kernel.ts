import type { GapCell } from '../chain/counts.js';
import type { RecordPatterns } from '../chain/record-patterns.js';

/**
 * What one chain of a data-augmentation sampler needs, as plain numbers: a job is posted to the
 * sampler's worker threads (structured clone), so it holds typed arrays and tuples, never a Fit.
 */
export type SamplerJob = GapJob | ErrorJob;

/** The gap sampler (augment.ts): exact surveys, pairs further apart than one step. */
export interface GapJob {
  readonly kind: 'gaps';
  readonly k: number;
  /** k × k observed one-step counts. */
  readonly counts: Float64Array;
  /** k × k prior (0: a structural zero). */
  readonly alpha: Float64Array;
  readonly gapCounts: readonly GapCell[];
}

/** The observer-error sampler (augment-errors.ts). */
export interface ErrorJob {
  readonly kind: 'errors';
  readonly k: number;
  /** Error matrices (1: one pooled; else pooled then one per observer). */
  readonly m: number;
  /** k × k recorded one-step counts: P's starting draw. */
  readonly counts: Float64Array;
  readonly alpha: Float64Array;
  /** k × k: 1 where the error matrices may be positive (the assessment saw the cell). */
  readonly support: Uint8Array;
  /** m × k × k assessment counts, matrix after matrix. */
  readonly assessment: Float64Array;
  readonly records: RecordPatterns;
  /** k: sites by first recorded state (π's starting draw). */
  readonly firstRecorded: Float64Array;
}

/**
 * One chain of a sampler, on its own stream: `start` draws the starting parameters, `sweep` one
 * sweep (latent paths, then parameters), `keep` writes the sweep just made as retained sweep `row`
 * (output i from row × width i, KernelShape) and its traced parameters into `trace`.
 */
export interface ChainKernel {
  start(): void;
  sweep(): void;
  keep(row: number, outputs: readonly Float64Array[], trace: Float64Array): void;
}

/** What each retained sweep of a job keeps (widths of the outputs, per sweep) and how many parameters are traced for R̂/ESS. */
export interface KernelShape {
  readonly widths: readonly number[];
  readonly traced: number;
}

/** The outputs of both samplers, for the bookkeeping of chain-runner.ts. */
export function shapeOf(job: SamplerJob): KernelShape {
  const kk = job.k * job.k;
  if (job.kind === 'gaps') return { widths: [kk], traced: kk };
  // True transitions, the first (pooled) error matrix, the observers' matrices (when m > 1), the latest true mix.
  return { widths: [kk, kk, (job.m - 1) * kk, job.k], traced: kk + job.m * kk };
}
