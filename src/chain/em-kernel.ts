import { EM_KERNEL_WASM } from './em-kernel-wasm.js';
import type { ErrorEStep } from './error-e-step.js';
import { patternLength, type RecordPatterns } from './record-patterns.js';
import { layOut, type KernelInstance } from '../kernel-memory.js';

/**
 * The host of the WebAssembly E-step (assembly/em-kernel.ts): one instance per thread, made on first
 * use, laid out by the latest `errorEStepKernel` (one EM at a time per thread: an EM runs to its end
 * synchronously). The E-step's numbers are error-e-step.ts errorEStep's, bit for bit
 * (test/chain/em-kernel.test.ts), several times faster (DEVELOPERS.md, Benchmarks).
 */
export interface ErrorEStepKernel {
  /** errorEStep(records, assessment, pi, p, e, k) for the records and k the kernel was made for. */
  eStep(assessment: Float64Array, pi: Float64Array, p: Float64Array, e: Float64Array): ErrorEStep;
}

interface Exports {
  readonly memory: WebAssembly.Memory;
  reserve(bytes: number): number;
  setPatterns(k: number, count: number, sites: number, start: number, at: number, column: number): void;
  setParameters(pi: number, p: number, e: number): void;
  setOutputs(transitions: number, records: number, first: number): void;
  setWork(em: number, alpha: number, beta: number, scale: number, support: number, supportCount: number): void;
  eStep(logLikelihood: number): number;
}

type Instance = KernelInstance<Exports>;

let instance: Instance | undefined;

function kernelInstance(): Instance {
  if (instance) return instance;
  const module = new WebAssembly.Module(Buffer.from(EM_KERNEL_WASM, 'base64'));
  const imports = { env: { log: Math.log, abort: () => { throw new Error('the EM kernel ran out of memory'); } } };
  instance = { exports: new WebAssembly.Instance(module, imports).exports as unknown as Exports, at: 0, bytes: 0, owner: 0 };
  return instance;
}

/**
 * An E-step kernel for these records, k states and `matrices` error matrices (E and the assessment
 * M·k² long): it owns this thread's kernel until the next call.
 */
export function errorEStepKernel(records: RecordPatterns, k: number, matrices: number): ErrorEStepKernel {
  const inst = kernelInstance();
  const kk = k * k;
  const surveys = records.start[records.count]!;
  let longest = 0;
  for (let q = 0; q < records.count; q++) longest = Math.max(longest, patternLength(records, q));
  // Bytes of each array, in the order laid out: 8-byte ones first, then the 4-byte ones.
  const f64Sizes = {
    sites: records.count, pi: k, p: kk, e: matrices * kk, transitions: kk, records: matrices * kk, first: k,
    em: longest * k, alpha: longest * k, beta: longest * k, scale: longest,
  };
  const i32Sizes = { start: records.count + 1, at: surveys, column: surveys, support: longest * k, supportCount: longest };
  const { f64, f64At, i32, i32At, owner } = layOut(inst, f64Sizes, i32Sizes);
  const { exports } = inst;
  f64.sites.set(records.sites);
  i32.start.set(records.start);
  i32.at.set(records.at.subarray(0, surveys));
  for (let s = 0; s < surveys; s++) i32.column[s] = records.matrix[s]! * kk + records.state[s]!;
  exports.setPatterns(k, records.count, f64At.sites, i32At.start, i32At.at, i32At.column);
  exports.setParameters(f64At.pi, f64At.p, f64At.e);
  exports.setOutputs(f64At.transitions, f64At.records, f64At.first);
  exports.setWork(f64At.em, f64At.alpha, f64At.beta, f64At.scale, i32At.support, i32At.supportCount);
  return {
    eStep(assessment, pi, p, e) {
      if (inst.owner !== owner) throw new Error('an EM kernel was used after another took its memory');
      if (assessment.length !== matrices * kk || e.length !== matrices * kk || p.length !== kk || pi.length !== k) {
        throw new Error('the EM kernel was given parameters of another size than it was made for');
      }
      f64.pi.set(pi);
      f64.p.set(p);
      f64.e.set(e);
      f64.transitions.fill(0);
      f64.records.set(assessment);
      f64.first.fill(0);
      // The assessment's terms first, as errorEStep adds them; then every pattern's, in the kernel.
      let logLikelihood = 0;
      for (let c = 0; c < assessment.length; c++) if (assessment[c]! > 0) logLikelihood += assessment[c]! * Math.log(e[c]!);
      logLikelihood = exports.eStep(logLikelihood);
      return { transitions: f64.transitions.slice(), records: f64.records.slice(), first: f64.first.slice(), logLikelihood };
    },
  };
}
