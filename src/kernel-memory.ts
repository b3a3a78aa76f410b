/**
 * A WebAssembly kernel's one instance on a thread, and which of its users holds the area of memory
 * the host reserved in it: a new user lays its arrays out over the old ones, so each user checks
 * `owner` before it runs (a stale view would read another's numbers).
 */
export interface KernelInstance<Exports extends { readonly memory: WebAssembly.Memory; reserve(bytes: number): number }> {
  readonly exports: Exports;
  /** Byte address of the reserved area (8-byte aligned) and its size. */
  at: number;
  bytes: number;
  owner: number;
}

/** Views of named arrays in a kernel's memory and their byte addresses (what the kernel is told). */
export interface KernelLayout<F extends string, I extends string> {
  readonly f64: Record<F, Float64Array>;
  readonly f64At: Record<F, number>;
  readonly i32: Record<I, Int32Array>;
  readonly i32At: Record<I, number>;
  /** This layout's owner number: the instance's `owner` until another layout takes the memory. */
  readonly owner: number;
}

/**
 * Lay arrays of the given lengths out in the kernel's reserved area, the 8-byte ones first, then
 * the 4-byte ones (so every array is aligned), growing the area by doubling when it is too small
 * (the kernel's stub allocator never frees: a reserve is taken once and reused by later users).
 * The EM, path and band kernels' hosts lay out their arrays by it.
 */
export function layOut<F extends string, I extends string, E extends { readonly memory: WebAssembly.Memory; reserve(bytes: number): number }>(
  inst: KernelInstance<E>, f64Sizes: Record<F, number>, i32Sizes: Record<I, number>): KernelLayout<F, I> {
  const f64Words = (Object.values(f64Sizes) as number[]).reduce((a, b) => a + b, 0);
  const i32Words = (Object.values(i32Sizes) as number[]).reduce((a, b) => a + b, 0);
  const bytes = 8 * f64Words + 4 * i32Words;
  if (inst.bytes < bytes) {
    inst.bytes = Math.max(bytes, 2 * inst.bytes);
    inst.at = inst.exports.reserve(inst.bytes + 8);
    inst.at += (8 - (inst.at % 8)) % 8;
  }
  const owner = ++inst.owner;
  const buffer = inst.exports.memory.buffer;
  let next = inst.at;
  const f64 = {} as Record<F, Float64Array>;
  const f64At = {} as Record<F, number>;
  for (const [name, n] of Object.entries(f64Sizes) as [F, number][]) {
    f64At[name] = next;
    f64[name] = new Float64Array(buffer, next, n);
    next += 8 * n;
  }
  const i32 = {} as Record<I, Int32Array>;
  const i32At = {} as Record<I, number>;
  for (const [name, n] of Object.entries(i32Sizes) as [I, number][]) {
    i32At[name] = next;
    i32[name] = new Int32Array(buffer, next, n);
    next += 4 * n;
  }
  return { f64, f64At, i32, i32At, owner };
}
