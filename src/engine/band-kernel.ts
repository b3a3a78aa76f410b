import { BAND_KERNEL_WASM } from './band-kernel-wasm.js';
import { layOut, type KernelInstance } from '../kernel-memory.js';

/**
 * The host of the WebAssembly band kernel (assembly/band-kernel.ts): one instance per thread, made on
 * first use, and one area of its memory — the columns, their results and the kernel's scratch —
 * laid out for each call by `layOut` (kernel-memory.ts), which grows it when a call needs more. The
 * kernel gives the bands that the bucket-counting selection of the JavaScript reference gives
 * (scripts/bands-reference.ts), bit for bit (test/engine/band-kernel.test.ts), without V8's
 * warm-up (DEVELOPERS.md, Benchmarks).
 */
interface Exports {
  readonly memory: WebAssembly.Memory;
  reserve(bytes: number): number;
  scratchBytes(n: number): number;
  bands(data: number, n: number, count: number, level: number, out: number, scratch: number): void;
}

/** Doubles of columns copied in per call at most (8 MB): longer runs of columns go in several calls. */
const BATCH_WORDS = 1 << 20;

let instance: KernelInstance<Exports> | undefined;

function kernel(): KernelInstance<Exports> {
  if (instance) return instance;
  const module = new WebAssembly.Module(Buffer.from(BAND_KERNEL_WASM, 'base64'));
  const imports = { env: { abort: () => { throw new Error('the band kernel ran out of memory'); } } };
  instance = { exports: new WebAssembly.Instance(module, imports).exports as unknown as Exports, at: 0, bytes: 0, owner: 0 };
  return instance;
}

/**
 * Bands of the columns of n draws laid end to end in `columns` (column c at `columns[c·n …]`):
 * [median, low, high, mean] of column c into `out[outOffset + 4c …]`, the median and the
 * (1 ∓ level)/2 quantiles of type 7 (Hyndman & Fan 1996), as d3-array's `quantileSorted` computes them
 * on the sorted column, and the mean summed in the column's order. Leaves `columns` as it was.
 * Columns must be free of NaN.
 */
export function bandsInto(columns: Float64Array, n: number, level: number, out: Float64Array, outOffset = 0): void {
  if (n === 0) throw new Error('quantiles of an empty sample');
  const count = columns.length / n;
  const inst = kernel();
  const batch = Math.max(1, Math.min(count, Math.floor(BATCH_WORDS / n)));
  const { f64, f64At } = layOut(inst, { data: batch * n, out: batch * 4, scratch: Math.ceil(inst.exports.scratchBytes(n) / 8) }, {});
  for (let from = 0; from < count; from += batch) {
    const m = Math.min(batch, count - from);
    f64.data.set(columns.subarray(from * n, (from + m) * n));
    inst.exports.bands(f64At.data, n, m, level, f64At.out, f64At.scratch);
    out.set(f64.out.subarray(0, 4 * m), outOffset + 4 * from);
  }
}
