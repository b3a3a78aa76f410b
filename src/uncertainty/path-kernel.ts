import { patternLength, type RecordPatterns } from '../chain/record-patterns.js';
import { recordPrefixes } from '../chain/record-prefixes.js';
import { layOut, type KernelInstance } from '../kernel-memory.js';
import { samplePathsTogether, type CompletedRecords, type PathScratch } from './error-sampler.js';
import { gammaVariates } from './gamma.js';
import type { Multinomial } from './multinomial.js';
import { zigguratNormals } from './normal.js';
import { PATH_KERNEL_WASM } from './path-kernel-wasm.js';
import type { RandomStream } from './random.js';
import type { SweepTables } from './sweep-tables.js';
import { xoshiroStart } from './xoshiro.js';

/**
 * The host of the WebAssembly path kernel (assembly/path-kernel.ts): one instance per thread, made
 * on first use, laid out by the latest `pathKernel` (one chain of the observer-error sampler at a
 * time per thread, as chain-runner.ts runs them). A sweep's true paths are drawn exactly as
 * error-sampler.ts samplePatternPaths draws them pattern by pattern (test/uncertainty/path-kernel.test.ts),
 * several times faster (DEVELOPERS.md, Benchmarks): the forward filter once per record prefix
 * (chain/record-prefixes.ts), made as the patterns reach it, and the one-site patterns' backward draws in the kernel, the patterns
 * of several sites by samplePathsTogether here, in pattern order.
 *
 * The chain's uniforms come from the kernel's block, so `random` — the chain stream's uniforms and
 * gamma variates, rebuilt from its key as random.ts builds them — must be the only way the chain
 * draws: then every consumer takes the stream's numbers in the order the JavaScript sampler does.
 */
export interface PathKernel {
  /** Uniforms and gamma variates of the chain's stream (random.ts generatorOfKey on its key), through the kernel's block. */
  readonly random: Pick<RandomStream, 'uniform' | 'gamma'>;
  /** This sweep's P and E (fillSweepTables) and π: views of the kernel's memory, written before `sweep`. */
  readonly tables: SweepTables;
  readonly pi: Float64Array;
  /** What the sweep drew (views of the kernel's memory): zeroed and filled by `sweep`. */
  readonly done: CompletedRecords;
  /** Every pattern's true paths given tables and π; `multinomial` on `random`, for the patterns of several sites. */
  sweep(multinomial: Multinomial, scratch: PathScratch): void;
}

interface Exports {
  readonly memory: WebAssembly.Memory;
  reserve(bytes: number): number;
  setStream(a: bigint, b: bigint, c: bigint, d: bigint): void;
  setLayout(k: number, block: number, pT: number, p: number, pLast: number, emit: number, emitSupport: number, emitCount: number, pi: number, weights: number): void;
  setPrefixes(count: number, parent: number, column: number, filter: number, support: number, supportCount: number): void;
  setPatterns(count: number, single: number, start: number, at: number, recorded: number, extend: number, nodeStart: number, nodeOf: number): void;
  setOutputs(transitions: number, recorded: number, first: number, latest: number): void;
  refill(): void;
  startSweep(): void;
  paths(from: number, position: number): number;
  uniformPosition(): number;
}

/** Uniforms per refill of the kernel's block (assembly/path-kernel.ts BLOCK). */
const BLOCK = 256;

type Instance = KernelInstance<Exports>;

let instance: Instance | undefined;

function kernelInstance(): Instance {
  if (instance) return instance;
  const module = new WebAssembly.Module(Buffer.from(PATH_KERNEL_WASM, 'base64'));
  const imports = { env: { abort: () => { throw new Error('the path kernel ran out of memory'); } } };
  instance = { exports: new WebAssembly.Instance(module, imports).exports as unknown as Exports, at: 0, bytes: 0, owner: 0 };
  return instance;
}

/**
 * A path kernel for k states, m error matrices and these records, its uniforms from the stream
 * whose key is `key` (random.ts keyOf): it owns this thread's kernel until the next call.
 */
export function pathKernel(k: number, m: number, records: RecordPatterns, key: Uint32Array): PathKernel {
  const inst = kernelInstance();
  const prefixes = recordPrefixes(records, k);
  const kk = k * k;
  const surveys = records.start[records.count]!;
  // Bytes of each array, in the order laid out: 8-byte ones first, then the 4-byte ones.
  const f64Sizes = { block: BLOCK, pT: kk, p: kk, emit: m * kk, pi: k, weights: k, filter: prefixes.count * k, transitions: kk, recorded: m * kk, first: k, latest: k };
  const i32Sizes = {
    pLast: k, emitSupport: m * kk, emitCount: m * k, parent: prefixes.count, column: prefixes.count, support: prefixes.count * k,
    supportCount: prefixes.count, single: records.count, start: records.count + 1, at: surveys, recordedColumn: surveys, extend: records.count,
    nodeStart: records.count + 1, nodeOf: prefixes.nodeOf.length,
  };
  const { f64, f64At, i32, i32At, owner } = layOut(inst, f64Sizes, i32Sizes);
  const { exports } = inst;
  i32.parent.set(prefixes.parent);
  i32.column.set(prefixes.column);
  i32.nodeStart.set(prefixes.nodeStart);
  i32.nodeOf.set(prefixes.nodeOf);
  for (let q = 0; q < records.count; q++) i32.single[q] = records.sites[q] === 1 ? 1 : 0;
  i32.start.set(records.start);
  i32.at.set(records.at.subarray(0, surveys));
  for (let s = 0; s < surveys; s++) i32.recordedColumn[s] = records.matrix[s]! * kk + records.state[s]!;
  i32.extend.set(records.extend);
  exports.setLayout(k, f64At.block, f64At.pT, f64At.p, i32At.pLast, f64At.emit, i32At.emitSupport, i32At.emitCount, f64At.pi, f64At.weights);
  exports.setPrefixes(prefixes.count, i32At.parent, i32At.column, f64At.filter, i32At.support, i32At.supportCount);
  exports.setPatterns(records.count, i32At.single, i32At.start, i32At.at, i32At.recordedColumn, i32At.extend, i32At.nodeStart, i32At.nodeOf);
  exports.setOutputs(f64At.transitions, f64At.recorded, f64At.first, f64At.latest);
  const w = xoshiroStart(key);
  const word = (i: number): bigint => (BigInt(w[2 * i + 1]!) << 32n) | BigInt(w[2 * i]!);
  exports.setStream(word(0), word(1), word(2), word(3));

  const block = f64.block;
  let position = BLOCK;
  const uniform = (): number => {
    if (position === BLOCK) {
      exports.refill();
      position = 0;
    }
    return block[position++]!;
  };
  const tables: SweepTables = { k, p: f64.p, pT: f64.pT, pLast: i32.pLast, emit: f64.emit, emitSupport: i32.emitSupport, emitCount: i32.emitCount };
  const done: CompletedRecords = { transitions: f64.transitions, recorded: f64.recorded, first: f64.first, latest: f64.latest };
  return {
    random: { uniform, gamma: gammaVariates(uniform, zigguratNormals(uniform)) },
    tables,
    pi: f64.pi,
    done,
    sweep(multinomial, scratch) {
      if (inst.owner !== owner) throw new Error('a path kernel was used after another took its memory');
      done.transitions.fill(0);
      done.recorded.fill(0);
      done.first.fill(0);
      done.latest.fill(0);
      exports.startSweep();
      for (let q = exports.paths(0, position); q < records.count; q = exports.paths(q + 1, position)) {
        if (q < 0) throw new Error('a record pattern has probability 0 under the sampler\'s parameters (checked at fit time)');
        position = exports.uniformPosition();
        // A pattern of several sites: its filtered laws gathered from its prefixes, its paths drawn together.
        const T = patternLength(records, q);
        if (scratch.filter.length < T * k) scratch.filter = new Float64Array(2 * T * k);
        for (let t = 0; t < T; t++) {
          const node = prefixes.nodeOf[prefixes.nodeStart[q]! + t]!;
          scratch.filter.set(f64.filter.subarray(node * k, node * k + k), t * k);
        }
        samplePathsTogether(records, q, T, f64.p, k, multinomial, scratch, done);
      }
      position = exports.uniformPosition();
    },
  };
}
