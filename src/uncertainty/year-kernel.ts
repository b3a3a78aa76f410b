import { F, RATIO, X, ZIGGURAT_R } from './normal.js';
import { xoshiroStart } from './xoshiro.js';
import { YEAR_KERNEL_WASM } from './year-kernel-wasm.js';

/**
 * The host of the WebAssembly year kernel (assembly/year-kernel.ts): one instance per thread, made on
 * first use, and one area of its memory that the latest `yearKernel` lays out as its own. The kernel
 * draws year matrices — Dirichlet(κᵢ·Pᵢ) rows — from xoshiro256** streams whose state lives in that
 * memory, giving exactly the numbers `generatorOfKey(key).gamma` and `sampleDirichlet` give in
 * JavaScript (test/uncertainty/year-kernel.test.ts), several times faster (DEVELOPERS.md, Benchmarks).
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
  /** Gamma(shape) variates of stream n into `out`, as the year matrices draw them (for tests and the bench). */
  gammas(n: number, shape: number, out: Float64Array): void;
  /**
   * The caller's own `work` words of the area (yearKernel's last argument), at byte address `workAt`,
   * for what the kernel's `planStep` reads and writes: the general projector's matrices and mixes
   * (project-chunk.ts). Laid out with the year kernel's, so no second reservation can move the memory
   * under either's views.
   */
  readonly work: Float64Array;
  readonly workAt: number;
  /**
   * The kernel's planStep and trackStep (assembly/year-kernel.ts): one step of G sub-populations, and
   * the first times tracked on its landscape mix; the arguments named for arrays are byte addresses in the area.
   */
  planStep(G: number, k: number, x: number, y: number, z: number, mats: number, events: number, eventMats: number, flags: number, total: number): void;
  trackStep(t: number, k: number, total: number, first: number, state: number, hasTarget: number, members: number, count: number,
    low: number, high: number, staysMet: number): void;
}

interface Exports {
  readonly memory: WebAssembly.Memory;
  reserve(bytes: number): number;
  setTables(x: number, f: number, ratio: number, r: number): void;
  prepare(p: number, kappa: number, k: number, cells: number): void;
  yearMatrix(state: number, p: number, kappa: number, cells: number, k: number, out: number): void;
  gammas(state: number, shape: number, n: number, out: number): void;
  projectSteps(m: number, k: number, x: number, y: number, n: number, out: number): void;
  planStep(G: number, k: number, x: number, y: number, z: number, mats: number, events: number, eventMats: number, flags: number, total: number): void;
  trackStep(t: number, k: number, total: number, first: number, state: number, hasTarget: number, members: number, count: number,
    low: number, high: number, staysMet: number): void;
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
}

/**
 * Doubles of scratch for `projectSteps`: a matrix of up to LIMITS.states = 100 states (10⁴), the mix
 * and its scratch, and a run of steps' mixes. Reserved once with the instance, never grown, so it
 * cannot move the memory under a year kernel's views.
 */
const PROJECTION_WORDS = 16384;

let instance: Instance | undefined;

function kernelInstance(): Instance {
  if (instance) return instance;
  const module = new WebAssembly.Module(Buffer.from(YEAR_KERNEL_WASM, 'base64'));
  // exp and log are the host's own, so both generators round them the same (see the kernel).
  const imports = { env: { exp: Math.exp, log: Math.log, abort: () => { throw new Error('the year kernel ran out of memory'); } } };
  const exports = new WebAssembly.Instance(module, imports).exports as unknown as Exports;
  const tables = exports.reserve((X.length + F.length + RATIO.length) * 8);
  const view = new Float64Array(exports.memory.buffer);
  view.set(X, tables / 8);
  view.set(F, tables / 8 + X.length);
  view.set(RATIO, tables / 8 + X.length + F.length);
  exports.setTables(tables, tables + X.length * 8, tables + (X.length + F.length) * 8, ZIGGURAT_R);
  instance = { exports, at: 0, bytes: 0, owner: 0, projection: exports.reserve(PROJECTION_WORDS * 8) };
  return instance;
}

/**
 * A kernel for k states, `streams` streams and `slots` drawn matrices (one per zone), with `work`
 * words for the caller. It owns this thread's area until the next call:
 * the engine makes one per call of its kernels, which run synchronously one at a time.
 */
export function yearKernel(k: number, streams: number, slots = 1, work = 0): YearKernel {
  const inst = kernelInstance();
  const k2 = k * k;
  // In 8-byte words: stream states (4 each); P, κ and the cells' (a, d, c) per slot; the year matrices; the gammas' scratch and their one cell; the caller's work.
  const words = 4 * streams + slots * (k2 + k + 3 * k2) + slots * k2 + GAMMA_CHUNK + 3 + work;
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
  const workAt = gammaAt + GAMMA_CHUNK + 3;
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
    years: f64.subarray(yearsAt, yearsAt + slots * k2),
    work: f64.subarray(workAt, workAt + work),
    workAt: workAt * 8,
    planStep: exports.planStep,
    trackStep: exports.trackStep,
    sample(n, z) {
      check(n);
      checkSlot(z);
      exports.yearMatrix((states + 4 * n) * 8, (pAt + z * k2) * 8, (kappaAt + z * k) * 8, (cellsAt + 3 * z * k2) * 8, k, (yearsAt + z * k2) * 8);
    },
    gammas(n, shape, out) {
      check(n);
      for (let m = 0; m < out.length; m += GAMMA_CHUNK) {
        const count = Math.min(GAMMA_CHUNK, out.length - m);
        exports.gammas((states + 4 * n) * 8, shape, count, gammaAt * 8);
        out.set(f64.subarray(gammaAt, gammaAt + count), m);
      }
    },
  };
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
