import { availableParallelism } from 'node:os';
import { startWatched, waitWhile, type WatchedWorker } from '../watched-worker.js';
import { shapeOf, type ChainKernel, type SamplerJob } from './chain-kernel.js';
import { errorKernel } from './error-kernel.js';
import { gapKernel } from './gap-kernel.js';
import { convergence } from './mcmc-diagnostics.js';
import { randomStreams, type RandomStream } from './random.js';
import type { ZoneChainTask } from './zone-posterior.js';

/** How long the data-augmentation sampler runs. */
export interface AugmentSettings {
  /** Independent chains, for the diagnostics (R̂ needs at least two). */
  readonly chains: number;
  /** Sweeps per chain dropped before keeping any. */
  readonly warmUp: number;
  /** Sweeps kept in all, shared equally between chains. */
  readonly retained: number;
  /** Every how many sweeps one is kept (1: all). */
  readonly thin: number;
}

/** What the chains of a sampler kept, chain after chain, and the diagnostics of every traced parameter. */
export interface ChainRun {
  readonly perChain: number;
  /** perChain × chains. */
  readonly retained: number;
  /** Output i of KernelShape: retained × width i. */
  readonly outputs: readonly Float64Array[];
  /** Split-R̂ and bulk ESS per traced parameter (NaN with fewer than 2 chains or 4 kept per chain). */
  readonly rhat: Float64Array;
  readonly ess: Float64Array;
}

/** The bookkeeping the chains of both samplers share (the control words, in shared memory): a job's chains as tasks. */
const NEXT = 0;
const DONE = 1;
const FAILED = 2;

/**
 * Run the chains of a sampler job and keep what they retain — the one owner of the chain
 * bookkeeping (warm-up, thinning, where each retained sweep goes, the traces and their split-R̂
 * and bulk ESS) for the gap and the observer-error samplers.
 *
 * Chain c runs on `random.stream('chain:c')` whatever thread runs it, and writes only its own rows
 * of the outputs and traces (shared memory), so the result is the same bit for bit for any number
 * of threads (test/uncertainty/sampler-threads.test.ts). `threads`: the number asked (`--threads`),
 * else every core when the job is large enough (samplerThreads), never more than the chains.
 */
export function runChains(job: SamplerJob, settings: AugmentSettings, random: RandomStream, threads?: number): ChainRun {
  const { chains, thin, warmUp } = settings;
  const perChain = Math.ceil(settings.retained / chains);
  const retained = perChain * chains;
  const shape = shapeOf(job);
  const shared = (n: number): Float64Array => new Float64Array(new SharedArrayBuffer(n * 8));
  const outputs = shape.widths.map((w) => shared(retained * w));
  const traces = shared(shape.traced * chains * perChain);
  const names = Array.from({ length: chains }, (_, c) => random.stream(`chain:${c}`).name);
  const task: ChainTask = { job, seed: random.seed, names, perChain, warmUp, thin, outputs, traces };
  runOnThreads(task, samplerThreads(threads, job, settings), (c) => runChain(task, c));
  const rhat = new Float64Array(shape.traced);
  const ess = new Float64Array(shape.traced);
  for (let cell = 0; cell < shape.traced; cell++) {
    const byChain = Array.from({ length: chains }, (_, c) => traces.subarray((cell * chains + c) * perChain, (cell * chains + c + 1) * perChain));
    const d = chains >= 2 && perChain >= 4 ? convergence(byChain) : { rhat: Number.NaN, ess: Number.NaN };
    rhat[cell] = d.rhat;
    ess[cell] = d.ess;
  }
  // Copied out of shared memory: a LatentSample is plain data (a fit carries it into its file).
  return { perChain, retained, outputs: outputs.map((o) => Float64Array.from(o)), rhat, ess };
}

/** What every thread needs to run any chain of a job: posted to the workers as it is. */
export interface ChainTask {
  readonly job: SamplerJob;
  readonly seed: number;
  /** Each chain's stream name (`…/chain:c`), rebuilt in a worker as randomStreams(seed).stream(name). */
  readonly names: readonly string[];
  readonly perChain: number;
  readonly warmUp: number;
  readonly thin: number;
  readonly outputs: readonly Float64Array[];
  /** traced × chains × perChain: parameter, then chain, then retained sweep. */
  readonly traces: Float64Array;
}

function kernelOf(job: SamplerJob, stream: RandomStream): ChainKernel {
  return job.kind === 'gaps' ? gapKernel(job, stream) : errorKernel(job, stream);
}

/** Chain c of the task, from its start to its last retained sweep. */
export function runChain(task: ChainTask, c: number): void {
  const { job, perChain, warmUp, thin, outputs, traces } = task;
  const chains = task.names.length;
  const kernel = kernelOf(job, randomStreams(task.seed).stream(task.names[c]!));
  const traced = shapeOf(job).traced;
  const trace = new Float64Array(traced);
  kernel.start();
  for (let sweep = 0; sweep < warmUp + perChain * thin; sweep++) {
    kernel.sweep();
    const after = sweep - warmUp;
    if (after < 0 || (after + 1) % thin !== 0) continue;
    const kept = (after + 1) / thin - 1;
    kernel.keep(c * perChain + kept, outputs, trace);
    for (let cell = 0; cell < traced; cell++) traces[(cell * chains + c) * perChain + kept] = trace[cell]!;
  }
}

/**
 * Least sampler work (units of workOf) worth starting worker threads for when no thread count is
 * asked. Measured with `npm run bench -- sampler-threads` (scripts/bench/sampler-threads.ts) on the
 * 2-core machine at load ~14: a sampler worker cost ~280 ms to start and take its first job (the
 * engine's note says 30–50 ms unloaded), and a unit took 21 ns on one thread on the heath fixture's
 * observer-error fit (108 ns on the demo's gap fit, where the per-sweep overheads dominate). A
 * second thread saves about half the work, so it pays from about 2 × 280 ms / 21 ns ≈ 3·10⁷ units.
 * The demo's gap sampler is 2·10⁶ (stays in-process); the heath fixture's 1.5·10⁸ and the
 * `observer` bench's ~2·10¹⁰ (10,000 sites × 12 steps × 8² × 3,000 sweeps) use every core.
 */
export const MIN_THREADED_SAMPLER_WORK = 3e7;

/** The work of a job in multiply-adds, roughly: per sweep, every latent step costs k² (a bridge step, a forward-filter step). */
export function workOf(job: SamplerJob, settings: AugmentSettings): number {
  let steps = 0;
  if (job.kind === 'gaps') for (const [, , g] of job.gapCounts) steps += g;
  else {
    const r = job.records;
    for (let q = 0; q < r.count; q++) steps += r.at[r.start[q + 1]! - 1]! + 1 + Math.max(0, r.extend[q]!);
  }
  const sweeps = settings.chains * settings.warmUp + Math.ceil(settings.retained / settings.chains) * settings.chains * settings.thin;
  return sweeps * steps * job.k * job.k;
}

/** Threads a sampler uses: the number asked, else every core for a large job (MIN_THREADED_SAMPLER_WORK), else one; never more than the chains. */
export function samplerThreads(requested: number | undefined, job: SamplerJob, settings: AugmentSettings): number {
  const wanted = requested ?? (workOf(job, settings) >= MIN_THREADED_SAMPLER_WORK ? availableParallelism() : 1);
  return Math.max(1, Math.min(wanted, settings.chains));
}

/**
 * What a sampler worker is posted (sampler-worker.ts runs its chains): a data-augmentation job's
 * chains (runChain), or the partial-pooling sampler's (zone-posterior.ts).
 */
export type SamplerTask = ChainTask | ZoneChainTask;

/**
 * Run every chain of a task (one per stream name) on `threads` threads: this one (`runOne`) and
 * threads − 1 workers (which run the same chain of the same task), taking chains from a shared counter.
 */
export function runOnThreads(task: SamplerTask, threads: number, runOne: (c: number) => void): void {
  const chains = task.names.length;
  if (threads <= 1) {
    for (let c = 0; c < chains; c++) runOne(c);
    return;
  }
  const workers = workersFor(threads - 1);
  const control = new Int32Array(new SharedArrayBuffer(3 * 4));
  for (const w of workers) w.post({ task, control });
  for (let c = Atomics.add(control, NEXT, 1); c < chains; c = Atomics.add(control, NEXT, 1)) runOne(c);
  try {
    for (let done = Atomics.load(control, DONE); done < workers.length; done = Atomics.load(control, DONE)) waitWhile(control, DONE, done, workers);
  } catch (error) {
    for (const w of kept) w.terminate();
    kept = [];
    throw error;
  }
  if (Atomics.load(control, FAILED)) throw new Error('a sampler worker thread failed (its error is on stderr)');
}

/** Workers kept for the life of the process (a hindcast runs the sampler once per origin); their watchers are unref'd. */
let kept: WatchedWorker[] = [];

function workersFor(n: number): WatchedWorker[] {
  if (kept.length < n) {
    kept.push(...Array.from({ length: n - kept.length }, () => startWatched('sampler-worker', 'uncertainty', import.meta.url, {}, [],
      'running the posterior sampler', 'use fewer retained sweeps (--retained) or --threads 1')));
  }
  return kept.slice(0, n);
}

/** A worker's side of runOnThreads: take chains until none are left, then count itself done and wake the waiting thread. */
export function drainChains(task: SamplerTask, control: Int32Array, runOne: (c: number) => void): void {
  const chains = task.names.length;
  try {
    for (let c = Atomics.add(control, NEXT, 1); c < chains; c = Atomics.add(control, NEXT, 1)) runOne(c);
  } catch (error) {
    Atomics.store(control, FAILED, 1);
    console.error(error);
  } finally {
    Atomics.add(control, DONE, 1);
    Atomics.notify(control, DONE);
  }
}
