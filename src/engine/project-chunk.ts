import type { RowChangeOutcome } from '../chain/row-change.js';
import type { LandscapeTarget } from '../scenario/scenario.js';
import type { RunPlan } from './plan.js';
import { changeRecipe, fillPlanMatrices, planWorkspace, unchangedRecipe, type PlanWorkspace } from './plan-matrices.js';
import { targetBounds } from './target.js';
import { DRAW_BLOCK } from '../uncertainty/draw-blocks.js';
import { startYearStreams } from './year-matrix.js';
import { projectTracked, reserveTracked, TRACKED_DRAWS, yearKernel, type YearKernel } from '../uncertainty/year-kernel.js';

/** A share within this of the largest counts as "most common" too (ties after rounding). */
export const MOST_COMMON_TOLERANCE = 1e-12;

/** Draws per block of the kernel's output buffer (see projectDraws); 256 draws × a chunk's steps × k fits in cache. */
export const OUTPUT_BLOCK = 256;

/**
 * Everything the projection carries from one chunk of years to the next, per draw: each
 * sub-population's current mix and the first-time tracking. This, not the years, is what a run
 * holds for its whole length: D × (G·k + k + 3) numbers.
 */
export interface ProjectionState {
  /** `xs[(d*G + g)*k + s]`: sub-population g's share of the whole area in state s, after the last step run. */
  readonly xs: Float64Array;
  /** Per draw: first step of the current run of steps meeting the target, −1 when it is not met. */
  readonly runStart: Int32Array;
  /**
   * Per draw, the first step from which the target holds `staysMet` consecutive steps within the
   * horizon (with staysMet 1: the first step it is met), or −1.
   */
  readonly firstAtTarget: Int32Array;
  /**
   * Per draw, how many consecutive steps the target has held up to and including the horizon (0:
   * not met at the horizon; horizon + 1: met in every step from the start). Set by the last chunk.
   */
  readonly targetRunAtHorizon: Int32Array;
  /** Per draw and state `[d*k + s]`: first step the state is the most common one, or −1. */
  readonly firstMostCommon: Int32Array;
}

/** A run's state, in shared memory so the engine's threads can each advance their blocks of draws. */
export function projectionState(draws: number, k: number, subPopulations: number): ProjectionState {
  const int32 = (n: number): Int32Array => new Int32Array(new SharedArrayBuffer(n * 4));
  return {
    xs: new Float64Array(new SharedArrayBuffer(draws * subPopulations * k * 8)),
    runStart: int32(draws).fill(-1),
    firstAtTarget: int32(draws).fill(-1),
    targetRunAtHorizon: int32(draws),
    firstMostCommon: int32(draws * k).fill(-1),
  };
}

/** What does not change during a run: the draws, the plan, the event years and the target. */
export interface ProjectionInputs {
  /** Matrix draws, flat D × k × k (MatrixDraws.data). */
  readonly P: Float64Array;
  readonly k: number;
  readonly draws: number;
  readonly horizon: number;
  /** The starting mix; with zones (plan.zones > 1) one per zone, zone z's at `z*k`. */
  readonly start: ArrayLike<number>;
  /** When true, `start` holds one start per draw (draw d at `d*Z*k`; carried-start.ts); else one for all. */
  readonly startByDraw?: boolean;
  /** Treatments, sub-populations and events; absent: the drawn matrix every step. */
  readonly plan?: RunPlan;
  /** For each of `plan.landscapeEvents`, `hits[e][d*(horizon+1) + t]` = 1 when it strikes in step t. */
  readonly hits: readonly Uint8Array[];
  readonly target?: LandscapeTarget;
  readonly onOutcome?: (draw: number, treatment: number, outcome: RowChangeOutcome) => void;
  /**
   * Year-to-year variation (absent: none): `concentration[d*k + i]`, κ of row i in draw d
   * (Infinity: the row does not vary), with the keys of the year streams (year-matrix.ts).
   */
  readonly variation?: { readonly concentration: Float64Array; readonly keys: Uint32Array };
}

/** One run of a projection call: its inputs, its state, and where its recorded mixes go (`[(r*k + s)*D + d]`). */
export interface ProjectedRun {
  readonly inputs: ProjectionInputs;
  readonly state: ProjectionState;
  readonly out: Float64Array;
}

/**
 * Steps `from` … `to − 1` of draws `d0` … `d1 − 1` of one run. The plain projection (one matrix,
 * nothing else) and its tracking run in WebAssembly (year-kernel.ts projectTracked); any other run
 * is projectDrawsTogether's with itself alone — the general step in the kernel (planStep), the same
 * bits as the JavaScript loop that ran runs without year matrices here until it was measured slower:
 * the uncertainty split's rerun without variation of the zoned demo, its projection on the main
 * thread (DEVELOPERS.md, Benchmarks).
 */
export function projectDraws(inputs: ProjectionInputs, state: ProjectionState, d0: number, d1: number,
  from: number, to: number, slotOf: Int32Array, out: Float64Array): void {
  if (inputs.variation || !runShape(inputs).plain) {
    projectDrawsTogether([{ inputs, state, out }], d0, d1, from, to, slotOf);
    return;
  }
  const { P, k, horizon, start, startByDraw, target } = inputs;
  const { xs, runStart, firstAtTarget, targetRunAtHorizon, firstMostCommon } = state;
  const { low: metLow, high: metHigh } = target ? targetBounds(target) : { low: 0, high: 0 };
  projectTracked({ P, k, D: inputs.draws, start, startByDraw: Boolean(startByDraw), slotOf, slots: slotCount(slotOf, from, to), out, xs, runStart,
    firstAtTarget, firstMostCommon, members: target ? Int32Array.from(target.states) : new Int32Array(0), hasTarget: Boolean(target),
    metLow, metHigh, staysMet: target ? target.staysMet : 1 }, d0, d1, from, to);
  if (to === horizon + 1) targetRunsAtHorizon(runStart, targetRunAtHorizon, horizon, d0, d1);
}

/**
 * Steps `from` … `to − 1` of draws `d0` … `d1 − 1`: x_{t+1} = x_t P (row vector times a
 * row-stochastic matrix) in every sub-population — with year-to-year variation, P is a fresh year
 * matrix around the draw's (year-matrix.ts), made before the year's treatments and site events
 * change it, and shared by every sub-population — then landscape events x ← x·E in the years they
 * strike; the landscape's mix is the sum over sub-populations. Step 0 is the starting mix. At every
 * step it tracks whether the target is met (the length of the run of years it has held, so a
 * target that must stay met is found in the same pass) and when each state first becomes the most
 * common; the landscape mix at step t with `slotOf[t] = r ≥ 0` goes to `out[(r*k + s)*D + d]`.
 *
 * `runs` are alternatives on the same matrix draws (the same P, k, draws, horizon and variation:
 * simulate.ts runs them side by side). A draw's year matrices depend only on the draw and the year
 * streams, not on the management, so they are drawn once per draw and chunk and every run reads
 * them: a comparison of four alternatives draws a quarter of the gamma variates it drew before,
 * and each run's numbers are the same bits as when it ran alone.
 *
 * The hot loop of sere: D × H × G × k² multiply-adds over flat typed arrays with scratch rows made
 * once per call, no allocation inside. A general run's step and tracking run in the WebAssembly
 * kernel (planStep, trackStep), on matrices and mixes in the kernel's area: with the JavaScript
 * left around them, about a third of the CPU of the loop they replaced in a comparison
 * (DEVELOPERS.md, Benchmarks). Shares are not renormalised: every matrix row sums to 1 within a
 * few ulps, so the total share drifts by about horizon × 1e-16. Each draw's arithmetic is the same
 * whichever chunks and blocks its steps are run in, so the numbers do not depend on the memory
 * budget.
 */
export function projectDrawsTogether(runs: readonly ProjectedRun[], d0: number, d1: number,
  from: number, to: number, slotOf: Int32Array): void {
  const { P, k, draws: D, variation } = runs[0]!.inputs;
  if (variation && runs.length === 1 && runShape(runs[0]!.inputs).plain) {
    projectYearsTracked(runs[0]!, d0, d1, from, to, slotOf);
    return;
  }
  const k2 = k * k;
  const Z = runs[0]!.inputs.plan ? runs[0]!.inputs.plan.zones : 1;
  const zoneStride = D * k2;
  // One area of the kernel's memory holds the chunk's year matrices of one draw, `years[((t − from)*Z + zone)*k2 + c]`,
  // drawn once for every run, and each general run's matrices and mixes, which its kernel step reads (generalWords).
  const yearWords = variation ? (to - from) * Z * k2 : 0;
  const words = runs.map((run) => generalWords(run.inputs, to - from, slotCount(slotOf, from, to)));
  const kernel = yearKernel(k, variation ? to - from : 0, variation ? Z : 0, { matrices: yearWords + words.reduce((a, b) => a + b, 0) });
  const years = variation ? kernel.matrices.subarray(0, yearWords) : undefined;
  let at = yearWords;
  const projectors = runs.map((run, n) => {
    const area = kernel.matrices.subarray(at, at + words[n]!);
    at += words[n]!;
    return runProjector(run, from, to, slotOf, years, kernel, area);
  });
  for (let d = d0; d < d1; d++) {
    if (variation) {
      if (d === d0 || d % DRAW_BLOCK === 0) startYearStreams(kernel, variation.keys, Math.floor(d / DRAW_BLOCK), runs[0]!.inputs.horizon, from, to);
      for (let zone = 0; zone < Z; zone++) kernel.setDraw(zone, P, zone * zoneStride + d * k2, variation.concentration, (zone * D + d) * k);
      // Each zone's year matrix around its own draw, from the same stream one zone after another,
      // every year of the chunk in one call, kept in `years` as every run reads every year of it.
      kernel.sampleSteps(Math.max(from, 1) - from, to - from, kernel.matrices, 0);
    }
    for (const project of projectors) project(d, d0, d1);
  }
}

/** Recorded slots among steps from … to − 1 (slotOf[t] ≥ 0: step t is recorded in that slot). */
function slotCount(slotOf: Int32Array, from: number, to: number): number {
  let slots = 0;
  for (let t = from; t < to; t++) if (slotOf[t]! >= 0) slots = Math.max(slots, slotOf[t]! + 1);
  return slots;
}

/** After a tracked projection reaches the horizon: each draw's run at the target, in steps, where one is going on. */
function targetRunsAtHorizon(runStart: Int32Array, targetRunAtHorizon: Int32Array, horizon: number, d0: number, d1: number): void {
  for (let d = d0; d < d1; d++) if (runStart[d]! >= 0) targetRunAtHorizon[d] = horizon - runStart[d]! + 1;
}

/** What shape a run's steps take: the plain projector's (one matrix, nothing else) or the general one's, and its sizes. */
function runShape(inputs: ProjectionInputs): { readonly plain: boolean; readonly G: number; readonly events: number; readonly recipes: number } {
  const { plan } = inputs;
  const trivial = !plan || plan.trivial;
  const Z = plan ? plan.zones : 1;
  const G = plan ? plan.subPopulations.length : 1;
  const events = plan ? plan.landscapeEvents.length : 0;
  const weight = plan ? plan.subPopulations[0]!.weight : 1;
  return { plain: trivial && events === 0 && G === 1 && Z === 1 && weight === 1, G, events, recipes: trivial ? 0 : plan!.plans.length };
}

/**
 * Words of the kernel's area a general run takes (none for a plain one): its recipes' matrices (or
 * the draw's matrix, without them), the landscape events' matrices, the G mixes and y, z and the
 * total (k each), then the matrix addresses (G u32), the events' flags (events × G bytes) and the
 * tracking's integers (trackStep: each state's first step as the most common, pending, the run's
 * start and the first step at the target, the target's members).
 */
function generalWords(inputs: ProjectionInputs, steps: number, slots: number): number {
  const { k } = inputs;
  const { plain, G, events } = runShape(inputs);
  // A plain run with year matrices takes plainProjector, which needs no area; without them (not a
  // case projectDrawsTogether is given today) the general step's area.
  if (plain && inputs.variation) return 0;
  const members = inputs.target ? inputs.target.states.length : 0;
  return ownWords(inputs, steps) + events * k * k + (G + 3) * k + Math.ceil((steps * G) / 2) + Math.ceil((steps * events * G) / 8) +
    Math.ceil((k + 3 + members) / 2) + Math.ceil(steps / 2) + Math.max(1, slots) * k * OUTPUT_BLOCK;
}

/** The general step's own matrices: each recipe's (with variation, each step's, as each is built from that step's year matrix), or the draw's. */
function ownWords(inputs: ProjectionInputs, steps: number): number {
  const { recipes } = runShape(inputs);
  return (inputs.variation && recipes > 0 ? steps : 1) * Math.max(recipes, 1) * inputs.k * inputs.k;
}

/**
 * The plain projection of one run with year-to-year variation (the demo's case): the year matrices
 * of TRACKED_DRAWS draws at a time, drawn as projectDrawsTogether draws them (the same streams, in
 * the same order), then projected with the tracking in WebAssembly (year-kernel.ts projectTracked:
 * the same bits as plainProjector, which this replaces for one run). Measured on the demo with
 * variation (`node --cpu-prof`, load 9): plainProjector's loop took 310 ms of the main thread and
 * 128 ms of the worker, most of it before V8 had optimised it.
 */
function projectYearsTracked(run: ProjectedRun, d0: number, d1: number, from: number, to: number, slotOf: Int32Array): void {
  const { inputs, state, out } = run;
  const { P, k, draws: D, horizon, start, startByDraw, target } = inputs;
  const variation = inputs.variation!;
  const k2 = k * k;
  const steps = to - from;
  const slots = slotCount(slotOf, from, to);
  const { low: metLow, high: metHigh } = target ? targetBounds(target) : { low: 0, high: 0 };
  const most = Math.min(TRACKED_DRAWS, d1 - d0);
  const layout = { k, slots, members: target ? Int32Array.from(target.states) : new Int32Array(0), years: true };
  // The area first, then the year kernel: a reserve may grow the memory under a kernel's views. The
  // kernel's own room holds the year matrices of `most` draws, `[((d − first)·steps + t − from)·k² …]`.
  reserveTracked(layout, most, steps);
  const kernel = yearKernel(k, steps, 1, { matrices: most * steps * k2 });
  const tracked = { ...layout, P: kernel.matrices, D, start, startByDraw: Boolean(startByDraw), slotOf, slots, out,
    xs: state.xs, runStart: state.runStart, firstAtTarget: state.firstAtTarget, firstMostCommon: state.firstMostCommon,
    hasTarget: Boolean(target), metLow, metHigh, staysMet: target ? target.staysMet : 1 };
  for (let first = d0; first < d1; first += TRACKED_DRAWS) {
    const nd = Math.min(TRACKED_DRAWS, d1 - first);
    for (let d = first; d < first + nd; d++) {
      if (d === d0 || d % DRAW_BLOCK === 0) startYearStreams(kernel, variation.keys, Math.floor(d / DRAW_BLOCK), horizon, from, to);
      kernel.setDraw(0, P, d * k2, variation.concentration, d * k);
      kernel.sampleSteps(Math.max(from, 1) - from, steps, kernel.matrices, (d - first) * steps * k2);
    }
    projectTracked(tracked, first, first + nd, from, to);
  }
  if (to === horizon + 1) targetRunsAtHorizon(state.runStart, state.targetRunAtHorizon, horizon, d0, d1);
}

/**
 * A draw's own matrices without year-to-year variation: its recipes' (fillPlanMatrices), or the
 * drawn matrix itself. Here, not in runProjector's closure, as are startMixes and the loops the
 * kernel took over (planSteps): V8 compiled that closure four times a forecast (130 ms of its
 * optimiser's time), throwing the code away whenever a run took a branch earlier runs had not
 * (`--trace-deopt`: "insufficient type feedback").
 */
function drawMatrices(plan: RunPlan | undefined, P: Float64Array, at: number, ws: PlanWorkspace | undefined,
  heard: ((tr: number, outcome: RowChangeOutcome) => void) | undefined, zoneStride: number, own: Float64Array): void {
  if (ws) fillPlanMatrices(plan!, P, at, ws, heard, zoneStride);
  else for (let c = 0; c < own.length; c++) own[c] = P[at + c]!;
}

/** Step 0 of a draw: sub-population g holds weights[g] of its zone's start, and the landscape's mix is their sum (the start itself with one zone). */
function startMixes(start: ArrayLike<number>, so: number, weights: readonly number[], zoneOf: Int32Array, G: number, k: number, Z: number,
  mixes: Float64Array, total: Float64Array): void {
  for (let g = 0; g < G; g++) for (let s = 0; s < k; s++) mixes[g * k + s] = weights[g]! * start[so + zoneOf[g]! * k + s]!;
  if (Z === 1) for (let s = 0; s < k; s++) total[s] = start[so + s]!;
  else {
    total.fill(0);
    for (let g = 0; g < G; g++) for (let s = 0; s < k; s++) total[s] += mixes[g * k + s]!;
  }
}

/** One run's projection of one draw through steps from … to − 1, with its scratch made once (see projectDrawsTogether). */
function runProjector(run: ProjectedRun, from: number, to: number, slotOf: Int32Array, years: Float64Array | undefined,
  kernel: YearKernel, area: Float64Array): (d: number, d0: number, d1: number) => void {
  const { inputs, state, out } = run;
  const { P, k, draws: D, horizon, start, startByDraw, plan, hits, target, onOutcome } = inputs;
  const { xs, runStart, firstAtTarget, targetRunAtHorizon, firstMostCommon } = state;
  const k2 = k * k;
  const steps = horizon + 1;
  const members = target ? Int32Array.from(target.states) : new Int32Array(0);
  const staysMet = target ? target.staysMet : 1;
  const nMembers = members.length;
  const { low: metLow, high: metHigh } = target ? targetBounds(target) : { low: 0, high: 0 };
  const variation = years !== undefined;
  const { plain, G, events, recipes } = runShape(inputs);
  // Recorded slots in this chunk, and a [slot][state][draw-in-block] buffer (`block`) copied out as
  // runs of OUTPUT_BLOCK numbers: writing straight into the [slot][state][draw] layout touched a new
  // cache line for every number (measured: a third of a comparison's time).
  const slots = slotCount(slotOf, from, to);
  if (plain && years) {
    const block = new Float64Array(Math.max(1, slots) * k * OUTPUT_BLOCK);
    return plainProjector({ k, horizon, start, startByDraw: Boolean(startByDraw), years, from, to, slotOf, block, out, D,
      xs, runStart, firstAtTarget, targetRunAtHorizon, firstMostCommon, members, staysMet, metLow, metHigh, hasTarget: Boolean(target) });
  }
  // Zones (MatrixDraws.zones): sub-population g runs on zone zoneOf[g]'s draws, Z·D matrices in all.
  const Z = plan ? plan.zones : 1;
  const zoneOf = plan ? Int32Array.from(plan.subPopulations, (g) => g.zone) : new Int32Array(1);
  const zoneStride = D * k2;
  const eventIn = plan?.eventIn;
  /** `built[p]`: the step recipe p's matrix was last built for, with variation (a year's recipes are built from its year matrix). */
  const built = new Int32Array(plan ? plan.plans.length : 0);
  const weights = plan ? plan.subPopulations.map((g) => g.weight) : [1];
  const planOf = plan?.planOf;
  const n = to - from;
  // The area (generalWords): what the kernel's planSteps reads and writes, addressed by byte offset
  // in its memory. With variation each step's recipes have their own matrices (`stepOwn` doubles a
  // step), built from that step's year matrix, as the kernel runs all of a draw's steps in one call.
  const own = area.subarray(0, ownWords(inputs, n));
  const stepOwn = variation && recipes > 0 ? recipes * k2 : 0;
  const workspace = recipes > 0 ? planWorkspace(plan!) : undefined;
  const wsOf = workspace && Array.from({ length: stepOwn > 0 ? n : 1 }, (_, s) =>
    ({ ...workspace, matrices: own.subarray(s * stepOwn, s * stepOwn + recipes * k2) }));
  const ws = wsOf?.[0];
  let at = own.length;
  const eventMats = area.subarray(at, at + events * k2);
  plan?.landscapeEvents.forEach((e, n) => eventMats.set(plan.events[e]!.matrix, n * k2));
  at += events * k2;
  const mixes = area.subarray(at, at + G * k);
  const y = area.subarray(at + G * k, at + (G + 1) * k);
  const z = area.subarray(at + (G + 1) * k, at + (G + 2) * k);
  const total = area.subarray(at + (G + 2) * k, at + (G + 3) * k);
  at += (G + 3) * k;
  // Step t's matrices (byte addresses) and event flags, at (t − from)·G and (t − from)·events·G.
  const mats = new Uint32Array(area.buffer, area.byteOffset + at * 8, n * G);
  at += Math.ceil((n * G) / 2);
  const flags = new Uint8Array(area.buffer, area.byteOffset + at * 8, n * events * G);
  at += Math.ceil((n * events * G) / 8);
  const tracked = new Int32Array(area.buffer, area.byteOffset + at * 8, k + 3 + nMembers);
  at += Math.ceil((k + 3 + nMembers) / 2);
  const firstAt = tracked.byteOffset;
  const stateAt = firstAt + k * 4;
  const membersAt = stateAt + 3 * 4;
  tracked.set(members, k + 3);
  const slotsOf = new Int32Array(area.buffer, area.byteOffset + at * 8, n);
  slotsOf.set(slotOf.subarray(from, to));
  at += Math.ceil(n / 2);
  // The output block, in the kernel's memory here, as planSteps writes the recorded mixes into it.
  const block = area.subarray(at, at + Math.max(1, slots) * k * OUTPUT_BLOCK);
  // Byte addresses in the kernel's memory, read once (a view's byteOffset is a property read per use).
  const yearsAt = years ? years.byteOffset : 0;
  const ownAt = own.byteOffset;
  const mixesAt = mixes.byteOffset;
  const yAt = y.byteOffset;
  const zAt = z.byteOffset;
  const matsAt = mats.byteOffset;
  const eventsAt = eventMats.byteOffset;
  const flagsAt = flags.byteOffset;
  const totalAt = total.byteOffset;
  const slotsAt = slotsOf.byteOffset;
  const blockAt = block.byteOffset;
  const { trackStep, planSteps } = kernel;
  const hasTarget = target ? 1 : 0;
  // With variation, a recipe that changes nothing (untreated land, a year without treatment) reads
  // the year matrix in place; the others copy it within the kernel's memory (copyWithin: no
  // allocation) and then apply their changes (changeRecipe).
  const unchanged = plan && ws ? Uint8Array.from(plan.plans, (_, p) => (unchangedRecipe(plan, p) ? 1 : 0)) : new Uint8Array(0);
  const memory = new Float64Array(area.buffer);
  // The draw being run, for the one `heard` made here (a closure per draw was garbage).
  let drawNow = 0;
  const heard = onOutcome && ((tr: number, outcome: RowChangeOutcome) => onOutcome(drawNow, tr, outcome));
  const ownWord = ownAt / 8;
  const yearsWord = yearsAt / 8;
  const firstStep = Math.max(from, 1);

  return (d, d0, d1) => {
    const b = (d - d0) % OUTPUT_BLOCK;
    drawNow = d;
    if (!variation) drawMatrices(plan, P, d * k2, ws, heard, zoneStride, own);
    built.fill(-1);
    const hitRow = d * steps;
    const x = d * G * k;
    for (let c = 0; c < G * k; c++) mixes[c] = xs[x + c]!;
    // The tracking's integers for trackStep: each state's first step as the most common; how many
    // states are not yet seen as the most common; the first step of the current run of steps meeting
    // the target (−1 when not met); the first step at the target.
    let pending = 0;
    for (let s = 0; s < k; s++) {
      tracked[s] = firstMostCommon[d * k + s]!;
      if (tracked[s] === -1) pending += 1;
    }
    tracked[k] = pending;
    tracked[k + 1] = runStart[d]!;
    tracked[k + 2] = firstAtTarget[d]!;
    if (from === 0) {
      startMixes(start, startByDraw ? d * Z * k : 0, weights, zoneOf, G, k, Z, mixes, total);
      const slot = slotOf[0]!;
      if (slot >= 0) for (let s = 0; s < k; s++) block[(slot * k + s) * OUTPUT_BLOCK + b] = total[s]!;
      trackStep(0, k, totalAt, firstAt, stateAt, hasTarget, membersAt, nMembers, metLow, metHigh, staysMet);
    }
    // Each step's matrices: its recipe's (built from the step's year matrix, with variation), the
    // year matrix, or the draw's; and which landscape events strike which sub-population. Then the
    // kernel runs the draw's steps (planSteps: planStep, the recorded mixes and trackStep at each,
    // the same operations in the same order as the JavaScript loop they replaced, so the same bits).
    for (let t = firstStep; t < to; t++) {
      const step = t - from;
      const yearAt = step * Z * k2;
      for (let g = 0; g < G; g++) {
        const recipe = ws ? planOf![t * G + g]! : -1;
        if (variation && ws) {
          const from2 = yearAt + plan!.plans[recipe]!.zone * k2;
          if (unchanged[recipe] === 1) {
            mats[step * G + g] = yearsAt + from2 * 8;
            continue;
          }
          const word = step * stepOwn + recipe * k2;
          if (built[recipe] !== t) {
            memory.copyWithin(ownWord + word, yearsWord + from2, yearsWord + from2 + k2);
            changeRecipe(plan!, recipe, wsOf![step]!, heard);
            built[recipe] = t;
          }
          mats[step * G + g] = ownAt + word * 8;
          continue;
        }
        mats[step * G + g] = ws ? ownAt + recipe * k2 * 8 : variation ? yearsAt + yearAt * 8 : ownAt;
      }
      for (let e = 0; e < events; e++) {
        const hit = hits[e]![hitRow + t] !== 0;
        for (let g = 0; g < G; g++) flags[(step * events + e) * G + g] = hit && !(eventIn && eventIn[e * G + g] === 0) ? 1 : 0;
      }
    }
    planSteps(firstStep, from, to, G, k, mixesAt, yAt, zAt, matsAt, events, eventsAt, flagsAt, totalAt, slotsAt, blockAt, OUTPUT_BLOCK, b,
      firstAt, stateAt, hasTarget, membersAt, nMembers, metLow, metHigh, staysMet);
    for (let c = 0; c < G * k; c++) xs[x + c] = mixes[c]!;
    for (let s = 0; s < k; s++) firstMostCommon[d * k + s] = tracked[s]!;
    const run = tracked[k + 1]!;
    firstAtTarget[d] = tracked[k + 2]!;
    runStart[d] = run;
    if (to === steps && run >= 0) targetRunAtHorizon[d] = horizon - run + 1;
    // Also after a call's first draw (the copy is of that one draw, rewritten with the rest later):
    // so the copy has run before V8 optimises the loop — seen first at the 256th draw, it threw the
    // optimised code away again and again (`node --trace-deopt`: "insufficient type feedback").
    if (b === OUTPUT_BLOCK - 1 || d === d1 - 1 || d === d0) {
      const first = d - b;
      for (let rs = 0; rs < slots * k; rs++) out.set(block.subarray(rs * OUTPUT_BLOCK, rs * OUTPUT_BLOCK + b + 1), rs * D + first);
    }
  };
}

/**
 * The projection of one draw when every step is the year matrix alone — no treatment, event, zone
 * or parcel: the demo's case with year-to-year variation. The same operations in the same order as
 * the general projector (so the same bits), in a function a fraction of its size: V8 compiles the
 * general one several times a run (on-stack replacement at each loop), which cost a small forecast
 * more CPU than its arithmetic (`node --trace-opt`: 0.1–0.3 s each under load). Without year
 * matrices the same projection runs in WebAssembly (projectTracked, from projectDraws).
 */
function plainProjector(c: {
  readonly k: number; readonly horizon: number; readonly start: ArrayLike<number>; readonly startByDraw: boolean;
  readonly years: Float64Array; readonly from: number; readonly to: number; readonly slotOf: Int32Array;
  readonly block: Float64Array; readonly out: Float64Array; readonly D: number;
  readonly xs: Float64Array; readonly runStart: Int32Array; readonly firstAtTarget: Int32Array; readonly targetRunAtHorizon: Int32Array;
  readonly firstMostCommon: Int32Array; readonly members: Int32Array; readonly staysMet: number; readonly metLow: number; readonly metHigh: number;
  readonly hasTarget: boolean;
}): (d: number, d0: number, d1: number) => void {
  const { k, horizon, start, startByDraw, years: M, from, to, slotOf, block, out, D, xs, runStart, firstAtTarget, targetRunAtHorizon,
    firstMostCommon, members, staysMet, metLow, metHigh, hasTarget } = c;
  const k2 = k * k;
  const steps = horizon + 1;
  const nMembers = members.length;
  const y = new Float64Array(k);
  const slots = slotCount(slotOf, from, to);
  return (d, d0, d1) => {
    const b = (d - d0) % OUTPUT_BLOCK;
    const x = d * k;
    let pending = 0;
    for (let s = 0; s < k; s++) if (firstMostCommon[x + s] === -1) pending += 1;
    let run = runStart[d]!;
    for (let t = from; t < to; t++) {
      if (t === 0) {
        const so = startByDraw ? x : 0;
        for (let s = 0; s < k; s++) xs[x + s] = start[so + s]!;
      } else {
        const base = (t - from) * k2;
        const x0 = xs[x]!;
        for (let j = 0; j < k; j++) y[j] = x0 * M[base + j]!;
        for (let i = 1; i < k; i++) {
          const xi = xs[x + i]!;
          if (xi === 0) continue;
          const row = base + i * k;
          for (let j = 0; j < k; j++) y[j] += xi * M[row + j]!;
        }
        for (let s = 0; s < k; s++) xs[x + s] = y[s]!;
      }
      const slot = slotOf[t]!;
      if (slot >= 0) {
        const into = slot * k * OUTPUT_BLOCK + b;
        for (let s = 0; s < k; s++) block[into + s * OUTPUT_BLOCK] = xs[x + s]!;
      }
      if (pending > 0) {
        let largest = 0;
        for (let s = 0; s < k; s++) if (xs[x + s]! > largest) largest = xs[x + s]!;
        for (let s = 0; s < k; s++) {
          if (firstMostCommon[x + s] === -1 && xs[x + s]! >= largest - MOST_COMMON_TOLERANCE) {
            firstMostCommon[x + s] = t;
            pending -= 1;
          }
        }
      }
      if (hasTarget) {
        let sum = 0;
        for (let n = 0; n < nMembers; n++) sum += xs[x + members[n]!]!;
        if (!(sum >= metLow && sum <= metHigh)) run = -1;
        else {
          if (run < 0) run = t;
          if (firstAtTarget[d] === -1 && t - run + 1 >= staysMet) firstAtTarget[d] = run;
        }
      }
    }
    runStart[d] = run;
    if (to === steps && run >= 0) targetRunAtHorizon[d] = horizon - run + 1;
    // Also after a call's first draw (the copy is of that one draw, rewritten with the rest later):
    // so the copy has run before V8 optimises the loop — seen first at the 256th draw, it threw the
    // optimised code away again and again (`node --trace-deopt`: "insufficient type feedback").
    if (b === OUTPUT_BLOCK - 1 || d === d1 - 1 || d === d0) {
      const first = d - b;
      for (let rs = 0; rs < slots * k; rs++) out.set(block.subarray(rs * OUTPUT_BLOCK, rs * OUTPUT_BLOCK + b + 1), rs * D + first);
    }
  };
}
