import { F, RATIO, X, ZIGGURAT_R } from './normal.js';
import { xoshiroStart } from './xoshiro.js';
import type { Elementary } from './gamma.js';
import { YEAR_KERNEL_WASM } from './year-kernel-wasm.js';
import { LIMITS } from '../limits.js';

/**
 * The host of the WebAssembly year kernel (assembly/year-kernel.ts): one instance per thread, made on
 * first use, and one area of its memory that the latest `yearKernel` lays out as its own. The kernel
 * draws year matrices — Dirichlet(κᵢ·Pᵢ) rows — from xoshiro256** streams whose state lives in that
 * memory, giving exactly the numbers gamma.ts's `gammaVariates` (on the stream's uniforms and ziggurat
 * normals, with the kernel's own exp and log in the boost: `kernelElementary`) and `sampleDirichlet` give in
 * JavaScript (test/uncertainty/year-kernel.test.ts), several times faster (DEVELOPERS.md, Benchmarks).
 * The plot step's multinomials run in the same module on the caller's room of that area
 * (`moveRows`, `multinomial`), as multinomial.ts draws them (test/uncertainty/plot-kernel.test.ts).
 */
export interface YearKernel {
  /** Start stream n (0 … streams − 1) from its key, `keys[at … at + 8)` (random.ts keyOf). */
  startStream(n: number, keys: Uint32Array, at: number): void;
  /**
   * Hold a drawn matrix in slot z (0 … slots − 1): `P[pOffset …]` (k × k) with row concentrations
   * `concentration[cOffset …]` (Infinity: the row does not vary). Copied in, and each cell's gamma
   * constants worked out, once per draw, not per year.
   */
  setDraw(z: number, P: Float64Array, pOffset: number, concentration: Float64Array, cOffset: number): void;
  /**
   * The year matrices, slot z's at `years[z·k² …]` (k × k): a view of the kernel's own memory that
   * `sample` writes into, read in place (no copy out), valid until the next `yearKernel`.
   */
  readonly years: Float64Array;
  /** One year's matrix around slot z's draw, from stream n, into `years[z·k² …]`. */
  sample(n: number, z: number): void;
  /**
   * What `sample(n, z)` makes for n = first … count − 1 and, for each, every slot z in turn (the
   * same draws from the same streams), written to `into[offset + (n·slots + z)·k² …]` rather than
   * `years`: a draw's years of a chunk in one call. `into` is `matrices`.
   */
  sampleSteps(first: number, count: number, into: Float64Array, offset: number): void;
  /** Gamma(shape) variates of stream n into `out`, as the year matrices draw them (for tests and the bench). */
  gammas(n: number, shape: number, out: Float64Array): void;
  /** The caller's own doubles in the kernel's memory (`room.matrices` of them): matrices for `moveRows`, the general projector's matrices and mixes for `planStep` (project-chunk.ts). */
  readonly matrices: Float64Array;
  /** The caller's own counts in the kernel's memory (`room.counts` of them), which `multinomial` and `moveRows` add to. */
  readonly counts: Int32Array;
  /**
   * Multinomial(count, p[pOffset … pOffset + width)) from stream n, added to `counts[outOffset …]`:
   * the numbers of multinomial.ts's sampler on the same stream, bit for bit. `p` is `years` or `matrices`.
   */
  multinomial(n: number, count: number, p: Float64Array, pOffset: number, width: number, outOffset: number): void;
  /**
   * One step of plots in k states from stream n: each `counts[from + i]` moves on as
   * Multinomial(·, row i of the k × k matrix at `m[mOffset …]`), added to `counts[to …]` — as
   * plot-counts.ts calls the multinomial, row by row. `m` is `years` or `matrices`.
   */
  moveRows(n: number, m: Float64Array, mOffset: number, from: number, to: number): void;
  /**
   * The kernel's planStep and trackStep (assembly/year-kernel.ts): one step of G sub-populations, and
   * the first times tracked on its landscape mix; planSteps, both for a draw's run of steps with
   * the recorded mixes stored; the arguments named for arrays are byte addresses in the kernel's
   * memory (in `matrices`, or `years`).
   */
  planStep(G: number, k: number, x: number, y: number, z: number, mats: number, events: number, eventMats: number, flags: number, total: number): void;
  trackStep(t: number, k: number, total: number, first: number, state: number, hasTarget: number, members: number, count: number,
    low: number, high: number, staysMet: number): void;
  planSteps(first: number, from: number, to: number, G: number, k: number, x: number, y: number, z: number, mats: number, events: number,
    eventMats: number, flags: number, total: number, slotOf: number, block: number, blockDraws: number, b: number,
    tracked: number, state: number, hasTarget: number, members: number, count: number, low: number, high: number, staysMet: number): void;
}

/** Room a caller asks of a year kernel for its own use: doubles and 32-bit counts. */
export interface KernelRoom {
  readonly matrices?: number;
  readonly counts?: number;
}

interface Exports {
  readonly memory: WebAssembly.Memory;
  reserve(bytes: number): number;
  setTables(x: number, f: number, ratio: number, r: number): void;
  prepare(p: number, kappa: number, k: number, cells: number): void;
  yearMatrix(state: number, p: number, kappa: number, cells: number, k: number, out: number): void;
  yearMatrices(states: number, p: number, kappa: number, cells: number, k: number, slots: number, first: number, count: number, out: number): void;
  gammas(state: number, shape: number, n: number, out: number): void;
  nativeExp(x: number): number;
  nativeLog(x: number): number;
  projectSteps(m: number, k: number, x: number, y: number, n: number, out: number): void;
  multinomialInto(state: number, n: number, p: number, k: number, out: number): void;
  moveRows(state: number, m: number, k: number, from: number, to: number): void;
  projectTracked(p: number, drawStride: number, stepStride: number, xs: number, firstMostCommon: number, runStart: number, firstAtTarget: number,
    nd: number, k: number, from: number, to: number, slotOf: number, block: number,
    members: number, nMembers: number, hasTarget: number, metLow: number, metHigh: number, staysMet: number, y: number): void;
  planStep(G: number, k: number, x: number, y: number, z: number, mats: number, events: number, eventMats: number, flags: number, total: number): void;
  trackStep(t: number, k: number, total: number, first: number, state: number, hasTarget: number, members: number, count: number,
    low: number, high: number, staysMet: number): void;
  planSteps(first: number, from: number, to: number, G: number, k: number, x: number, y: number, z: number, mats: number, events: number,
    eventMats: number, flags: number, total: number, slotOf: number, block: number, blockDraws: number, b: number,
    tracked: number, state: number, hasTarget: number, members: number, count: number, low: number, high: number, staysMet: number): void;
  stationaryMix(p: number, k: number, members: number, m: number, a: number, rowScale: number, pi: number, mix: number): number;
}

/** Gamma variates made per call of the kernel's `gammas`, in the area's scratch. */
const GAMMA_CHUNK = 1024;

interface Instance {
  readonly exports: Exports;
  /** The area's start (bytes) and size; a larger need reserves a new, doubled area. */
  at: number;
  bytes: number;
  /** Bumped whenever a kernel takes the area, so a kernel laid out before can tell it is stale. */
  owner: number;
  /** The projection's own scratch (`projectSteps`), PROJECTION_WORDS doubles reserved with the instance. */
  readonly projection: number;
  /** `stationaryMix`'s scratch, STATIONARY_WORDS doubles reserved with the instance. */
  readonly stationary: number;
  /** `projectTracked`'s area (bytes): its start and size, reserved anew (doubled) when a call needs more. */
  trackedAt: number;
  trackedBytes: number;
}

/**
 * Doubles of scratch for `projectSteps`: a matrix of up to LIMITS.states = 100 states (10⁴), the mix
 * and its scratch, and a run of steps' mixes. Reserved once with the instance, never grown, so it
 * cannot move the memory under a year kernel's views.
 */
const PROJECTION_WORDS = 16384;

/**
 * Doubles of scratch for `stationaryMix`: a matrix of up to LIMITS.states states and its mix, a
 * class's block of as many, its pivots and shares, and the class's members (two to a double).
 */
const STATIONARY_WORDS = 2 * LIMITS.states ** 2 + 4 * LIMITS.states;

let instance: Instance | undefined;

function kernelInstance(): Instance {
  if (instance) return instance;
  const module = new WebAssembly.Module(Buffer.from(YEAR_KERNEL_WASM, 'base64'));
  // exp and log are the host's own, so both generators round them the same (see the kernel).
  const imports = { env: { exp: Math.exp, log: Math.log, log1p: Math.log1p, abort: () => { throw new Error('the year kernel ran out of memory'); } } };
  const exports = new WebAssembly.Instance(module, imports).exports as unknown as Exports;
  const tables = exports.reserve((X.length + F.length + RATIO.length) * 8);
  const view = new Float64Array(exports.memory.buffer);
  view.set(X, tables / 8);
  view.set(F, tables / 8 + X.length);
  view.set(RATIO, tables / 8 + X.length + F.length);
  exports.setTables(tables, tables + X.length * 8, tables + (X.length + F.length) * 8, ZIGGURAT_R);
  instance = { exports, at: 0, bytes: 0, owner: 0, projection: exports.reserve(PROJECTION_WORDS * 8),
    stationary: exports.reserve(STATIONARY_WORDS * 8), trackedAt: 0, trackedBytes: 0 };
  return instance;
}

/**
 * A kernel for k states, `streams` streams, `slots` drawn matrices (one per zone) and the caller's
 * `room`. It owns this thread's area until the next call: the engine makes one per call of its
 * kernels, which run synchronously one at a time.
 */
export function yearKernel(k: number, streams: number, slots = 1, room: KernelRoom = {}): YearKernel {
  const inst = kernelInstance();
  const k2 = k * k;
  const ownDoubles = room.matrices ?? 0;
  const ownCounts = room.counts ?? 0;
  // In 8-byte words: stream states (4 each); P, κ and the cells' (a, d, c) per slot; the year matrices;
  // the gammas' scratch and their one cell; the caller's doubles and counts (two a word).
  const words = 4 * streams + slots * (k2 + k + 3 * k2) + slots * k2 + GAMMA_CHUNK + 3 + ownDoubles + Math.ceil(ownCounts / 2);
  if (inst.bytes < words * 8) {
    inst.bytes = Math.max(words * 8, 2 * inst.bytes);
    inst.at = inst.exports.reserve(inst.bytes);
  }
  const owner = ++inst.owner;
  const { exports } = inst;
  const base = inst.at / 8;
  const states = base;
  const pAt = states + 4 * streams;
  const kappaAt = pAt + slots * k2;
  const cellsAt = kappaAt + slots * k;
  const yearsAt = cellsAt + slots * 3 * k2;
  const gammaAt = yearsAt + slots * k2;
  const ownAt = gammaAt + GAMMA_CHUNK + 3;
  const countsAt = ownAt + ownDoubles;
  // The memory grows only in reserve, so these views stay attached until the next yearKernel.
  const f64 = new Float64Array(exports.memory.buffer);
  const u32 = new Uint32Array(exports.memory.buffer);
  const check = (n: number): void => {
    if (inst.owner !== owner) throw new Error('a year kernel was used after another took its memory');
    if (!(n >= 0 && n < streams)) throw new Error(`stream ${n} is outside 0 … ${streams - 1}`);
  };
  const checkSlot = (z: number): void => {
    if (!(z >= 0 && z < slots)) throw new Error(`slot ${z} is outside 0 … ${slots - 1}`);
  };
  const years = f64.subarray(yearsAt, yearsAt + slots * k2);
  const matrices = f64.subarray(ownAt, ownAt + ownDoubles);
  const counts = new Int32Array(exports.memory.buffer, countsAt * 8, ownCounts);
  /** The byte address of `view[offset]`, for a view that is `years` or `matrices`, checked to hold `n` doubles from there. */
  const addressOf = (view: Float64Array, offset: number, n: number): number => {
    if (view !== years && view !== matrices) throw new Error('a kernel reads matrices from its own years or matrices only');
    if (!(offset >= 0 && offset + n <= view.length)) throw new Error(`doubles ${offset} … ${offset + n - 1} are outside 0 … ${view.length - 1}`);
    return view.byteOffset + offset * 8;
  };
  const countsAddress = (offset: number, n: number): number => {
    if (!(offset >= 0 && offset + n <= ownCounts)) throw new Error(`counts ${offset} … ${offset + n - 1} are outside 0 … ${ownCounts - 1}`);
    return counts.byteOffset + offset * 4;
  };
  return {
    startStream(n, keys, at) {
      check(n);
      u32.set(xoshiroStart(keys.subarray(at, at + 8)), (states + 4 * n) * 2);
    },
    setDraw(z, P, pOffset, concentration, cOffset) {
      check(0);
      checkSlot(z);
      // Element by element, not through subarray views: this runs once per draw and zone, and the views were garbage.
      for (let c = 0; c < k2; c++) f64[pAt + z * k2 + c] = P[pOffset + c]!;
      for (let i = 0; i < k; i++) f64[kappaAt + z * k + i] = concentration[cOffset + i]!;
      exports.prepare((pAt + z * k2) * 8, (kappaAt + z * k) * 8, k, (cellsAt + 3 * z * k2) * 8);
    },
    years,
    matrices,
    counts,
    planStep: exports.planStep,
    trackStep: exports.trackStep,
    planSteps: exports.planSteps,
    sample(n, z) {
      check(n);
      checkSlot(z);
      exports.yearMatrix((states + 4 * n) * 8, (pAt + z * k2) * 8, (kappaAt + z * k) * 8, (cellsAt + 3 * z * k2) * 8, k, (yearsAt + z * k2) * 8);
    },
    sampleSteps(first, count, into, offset) {
      if (count > first) {
        check(first);
        check(count - 1);
      }
      exports.yearMatrices(states * 8, pAt * 8, kappaAt * 8, cellsAt * 8, k, slots, first, count, addressOf(into, offset, Math.max(0, count * slots * k2)));
    },
    gammas(n, shape, out) {
      check(n);
      for (let m = 0; m < out.length; m += GAMMA_CHUNK) {
        const count = Math.min(GAMMA_CHUNK, out.length - m);
        exports.gammas((states + 4 * n) * 8, shape, count, gammaAt * 8);
        out.set(f64.subarray(gammaAt, gammaAt + count), m);
      }
    },
    multinomial(n, count, p, pOffset, width, outOffset) {
      check(n);
      exports.multinomialInto((states + 4 * n) * 8, count, addressOf(p, pOffset, width), width, countsAddress(outOffset, width));
    },
    moveRows(n, m, mOffset, from, to) {
      check(n);
      exports.moveRows((states + 4 * n) * 8, addressOf(m, mOffset, k2), k, countsAddress(from, k), countsAddress(to, k));
    },
  };
}

/**
 * The exp and log of the kernel's gamma boost (AssemblyScript's NativeMath, not the host's Math:
 * assembly/year-kernel.ts), for a JavaScript reference of its variates.
 */
export function kernelElementary(): Elementary {
  const { exports } = kernelInstance();
  return { exp: exports.nativeExp, log: exports.nativeLog };
}

/** A view of the kernel's memory for `projectSteps`, remade when the memory has grown. */
let projectionView: Float64Array | undefined;

/**
 * n steps of x ← x·M in WebAssembly (assembly/year-kernel.ts `projectSteps`: the same operations in
 * the same order as the JavaScript projector, so the same bits): M is `P[pOffset …]` (k × k), the
 * mix starts at `x[xOffset …]` (k) and is left there after the last step; step s's mix is written to
 * `into[s·k …]`. Runs of steps are cut to fit the kernel's fixed scratch.
 */
export function projectSteps(P: Float64Array, pOffset: number, k: number, x: Float64Array, xOffset: number, n: number, into: Float64Array): void {
  const inst = kernelInstance();
  const k2 = k * k;
  const mAt = inst.projection / 8;
  const xAt = mAt + k2;
  const yAt = xAt + k;
  const outAt = yAt + k;
  const run = Math.floor((PROJECTION_WORDS - k2 - 2 * k) / k);
  if (run < 1) throw new Error(`the projection kernel holds at most ${Math.floor(Math.sqrt(PROJECTION_WORDS))} states`);
  // The memory grows only when a year kernel reserves a larger area: a view of the old buffer would then be empty.
  if (projectionView?.buffer !== inst.exports.memory.buffer) projectionView = new Float64Array(inst.exports.memory.buffer);
  const f64 = projectionView;
  f64.set(P.subarray(pOffset, pOffset + k2), mAt);
  f64.set(x.subarray(xOffset, xOffset + k), xAt);
  for (let s = 0; s < n; s += run) {
    const m = Math.min(run, n - s);
    inst.exports.projectSteps(mAt * 8, k, xAt * 8, yAt * 8, m, outAt * 8);
    into.set(f64.subarray(outAt, outAt + m * k), s * k);
  }
  x.set(f64.subarray(xAt, xAt + k), xOffset);
}

/** What `projectTracked` projects and where its results go: a run's arrays (project-chunk.ts ProjectionInputs and ProjectionState). */
export interface TrackedRun {
  /**
   * Matrix draws, D × k × k; with `years`, the year matrices of the draws of this call instead:
   * draw d's for step t at ((d − d0)·(to − from) + t − from)·k² (step `from` unused when it is 0).
   */
  readonly P: Float64Array;
  readonly years?: boolean;
  readonly k: number;
  readonly D: number;
  /** One start for every draw, or with `startByDraw` one per draw (draw d at d·k). */
  readonly start: ArrayLike<number>;
  readonly startByDraw: boolean;
  /** Per step, the slot of `out` its mixes go to (`out[(r·k + s)·D + d]`), or −1; `slots` of them in this chunk. */
  readonly slotOf: Int32Array;
  readonly slots: number;
  readonly out: Float64Array;
  readonly xs: Float64Array;
  readonly runStart: Int32Array;
  readonly firstAtTarget: Int32Array;
  readonly firstMostCommon: Int32Array;
  /** The target's states; `hasTarget` false: no target. */
  readonly members: Int32Array;
  readonly hasTarget: boolean;
  readonly metLow: number;
  readonly metHigh: number;
  readonly staysMet: number;
}

/** Draws per call of the kernel's `projectTracked`: its mixes of a chunk, slots × k × 256 doubles, stay in cache. */
export const TRACKED_DRAWS = 256;

/**
 * Steps from … to − 1 of draws d0 … d1 − 1 of a plain projection (every step the draw's own matrix)
 * with its tracking — the first step each state is the most common, the runs of steps meeting the
 * target — in WebAssembly (assembly/year-kernel.ts `projectTracked`, the same numbers as the
 * JavaScript projector): each run of TRACKED_DRAWS draws' matrices, mixes and tracks copied in,
 * projected, and copied back, the recorded mixes into `out`.
 */
export function projectTracked(run: TrackedRun, d0: number, d1: number, from: number, to: number): void {
  const inst = kernelInstance();
  const { P, k, D, start, startByDraw, slotOf, slots, out, xs, runStart, firstAtTarget, firstMostCommon, members } = run;
  const k2 = k * k;
  const steps = to - from;
  const drawStride = run.years ? steps * k2 : k2;
  const pFirst = run.years ? d0 : 0;
  const { pAt, xsAt, yAt, blockAt, fmcAt, runAt, reachedAt, slotAt, membersAt } = reserveTracked(run, Math.min(TRACKED_DRAWS, d1 - d0), steps);
  const base = inst.trackedAt;
  // Views made after the reserve, which is what may grow the memory.
  const f64 = new Float64Array(inst.exports.memory.buffer);
  const i32 = new Int32Array(inst.exports.memory.buffer);
  i32.set(slotOf.subarray(from, to), (base + slotAt) / 4);
  i32.set(members, (base + membersAt) / 4);
  for (let first = d0; first < d1; first += TRACKED_DRAWS) {
    const nd = Math.min(TRACKED_DRAWS, d1 - first);
    f64.set(P.subarray((first - pFirst) * drawStride, (first - pFirst + nd) * drawStride), (base + pAt) / 8);
    if (from === 0) {
      const x = (base + xsAt) / 8;
      for (let d = 0; d < nd; d++) {
        const so = startByDraw ? (first + d) * k : 0;
        for (let s = 0; s < k; s++) f64[x + d * k + s] = start[so + s]!;
      }
    } else f64.set(xs.subarray(first * k, (first + nd) * k), (base + xsAt) / 8);
    i32.set(firstMostCommon.subarray(first * k, (first + nd) * k), (base + fmcAt) / 4);
    i32.set(runStart.subarray(first, first + nd), (base + runAt) / 4);
    i32.set(firstAtTarget.subarray(first, first + nd), (base + reachedAt) / 4);
    inst.exports.projectTracked(base + pAt, drawStride, run.years ? k2 : 0, base + xsAt, base + fmcAt, base + runAt, base + reachedAt, nd, k, from, to, base + slotAt,
      base + blockAt, base + membersAt, members.length, run.hasTarget ? 1 : 0, run.metLow, run.metHigh, run.staysMet, base + yAt);
    xs.set(f64.subarray((base + xsAt) / 8, (base + xsAt) / 8 + nd * k), first * k);
    firstMostCommon.set(i32.subarray((base + fmcAt) / 4, (base + fmcAt) / 4 + nd * k), first * k);
    runStart.set(i32.subarray((base + runAt) / 4, (base + runAt) / 4 + nd), first);
    firstAtTarget.set(i32.subarray((base + reachedAt) / 4, (base + reachedAt) / 4 + nd), first);
    const block = (base + blockAt) / 8;
    for (let rs = 0; rs < slots * k; rs++) out.set(f64.subarray(block + rs * nd, block + (rs + 1) * nd), rs * D + first);
  }
}

/**
 * Lay out `projectTracked`'s area for `most` draws a call over `steps` steps, reserving more of the
 * memory if it is short. In bytes from the area's start, each part 8-aligned: matrices, mixes,
 * scratch row, recorded mixes; then the i32 parts. A caller that also holds a year kernel calls it
 * before making that kernel (a reserve may grow the memory under the kernel's views).
 */
export function reserveTracked(run: Pick<TrackedRun, 'k' | 'slots' | 'members' | 'years'>, most: number, steps: number) {
  const inst = kernelInstance();
  const { k, slots, members } = run;
  const round8 = (n: number): number => Math.ceil(n / 8) * 8;
  const pAt = 0;
  const xsAt = pAt + most * k * k * (run.years ? steps : 1) * 8;
  const yAt = xsAt + most * k * 8;
  const blockAt = yAt + k * 8;
  const fmcAt = blockAt + Math.max(1, slots) * k * most * 8;
  const runAt = fmcAt + round8(most * k * 4);
  const reachedAt = runAt + round8(most * 4);
  const slotAt = reachedAt + round8(most * 4);
  const membersAt = slotAt + round8(steps * 4);
  const bytes = membersAt + round8(members.length * 4);
  if (inst.trackedBytes < bytes) {
    inst.trackedBytes = Math.max(bytes, 2 * inst.trackedBytes);
    inst.trackedAt = inst.exports.reserve(inst.trackedBytes);
    // The reserve may have grown the memory, leaving a year kernel's views empty: make it refuse to run.
    inst.owner += 1;
  }
  return { pAt, xsAt, yAt, blockAt, fmcAt, runAt, reachedAt, slotAt, membersAt };
}

/** Views of the kernel's memory for `stationaryInKernel`, remade when the memory has grown; and its mix's, for its k. */
let stationaryF64: Float64Array | undefined;
let stationaryI32: Int32Array | undefined;
let stationaryOut: Float64Array | undefined;

/**
 * The stationary mix of `p[offset …]` (k × k) whose one closed class is `members` (chain/classes.ts),
 * in the kernel: assembly/year-kernel.ts stationaryMix does stationaryGivenClasses's and gth's
 * operations in their order (Grassmann, Taksar & Heyman 1985), so the same bits, without the
 * JavaScript's arrays and closures per matrix or its warm-up — the zoned demo works out ~28,000 of
 * them (each zone's, each treated part's), which took 80–90 ms of a first call and ~40 ms once V8
 * had optimised it. The mix returned is a view of the kernel's scratch, valid until the next call.
 */
export function stationaryInKernel(p: ArrayLike<number>, k: number, offset: number, members: Int32Array): Float64Array {
  const inst = kernelInstance();
  const { memory } = inst.exports;
  if (stationaryF64?.buffer !== memory.buffer) {
    stationaryF64 = new Float64Array(memory.buffer);
    stationaryI32 = new Int32Array(memory.buffer);
    stationaryOut = undefined;
  }
  const f64 = stationaryF64;
  const m = members.length;
  const k2 = k * k;
  // In doubles from the scratch's start: the matrix, its mix, the class's block, pivots, shares, then the members.
  const pAt = inst.stationary / 8;
  const mixAt = pAt + k2;
  const aAt = mixAt + k;
  const rowAt = aAt + m * m;
  const piAt = rowAt + m;
  const membersAt = piAt + m;
  for (let c = 0; c < k2; c++) f64[pAt + c] = p[offset + c]!;
  stationaryI32!.set(members, membersAt * 2);
  const failed = inst.exports.stationaryMix(pAt * 8, k, membersAt * 8, m, aAt * 8, rowAt * 8, piAt * 8, mixAt * 8);
  if (failed) throw new Error(`internal: GTH pivot not positive at state ${failed - 1}; the matrix is not irreducible`);
  if (stationaryOut?.length !== k) stationaryOut = f64.subarray(mixAt, mixAt + k);
  return stationaryOut;
}
