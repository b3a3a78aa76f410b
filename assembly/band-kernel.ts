/**
 * The bands of columns of draws in WebAssembly (AssemblyScript, compiled by `npm run build` through
 * scripts/build-wasm.mjs into src/engine/band-kernel-wasm.ts): for each column its sum, smallest and
 * largest value in one pass, then the type-7 quantiles (Hyndman & Fan 1996) at (1 − level)/2, 0.5
 * and (1 + level)/2 from the exact order statistics.
 *
 * Why: the bands ran mostly before V8 had optimised them — a forecast summarises a few hundred
 * columns once, and a fresh process spent most of that in the interpreter and baseline tiers
 * (DEVELOPERS.md, Benchmarks). WebAssembly is compiled before it runs, so the first column runs
 * at the speed of the last.
 *
 * The method is that of the JavaScript reference (scripts/bands-reference.ts), step
 * for step, so every result has the same bits (test/engine/band-kernel.test.ts): selection by
 * distributive partitioning (Allison & Noga 1980, after Dobosiewicz 1978) — one pass counts the
 * values in B equal-width buckets over [min, max], a second copies out only the buckets holding a
 * wanted rank, and the search continues there, by sorting once a run is at most 64 values long, or
 * by Hoare's selection (Hoare 1961) if the range is not finite or a bucket stays crowded after four
 * rounds. The bucket index ⌊(x − min)·B/(max − min)⌋ never decreases as x grows (subtraction and
 * multiplication by a positive number round monotonically), so the result is the number a sort
 * would put at that rank, not a binned one. The sum runs in the column's order, so the mean has
 * the bits of the JavaScript loop; +, −, ×, ÷ are correctly rounded IEEE 754 operations in both,
 * and nothing is fused or reordered.
 *
 * Memory is laid out by the host (src/engine/band-kernel.ts); this module computes, using the
 * scratch the host gives it as a stack (`top`), each call returning it as it found it.
 */

/** Runs this short are sorted outright: a sort beats counting on a few dozen values. */
const SORT_AT_MOST: i32 = 64;
/** Buckets per counting round: one per 8 values, at most this many (8 KB of counts, in L1 cache). */
const MAX_BUCKETS: i32 = 2048;
/** Counting rounds before a bucket that stays crowded goes to Hoare's selection. */
const MAX_ROUNDS: i32 = 4;

/** The next free byte of the host's scratch. */
let top: usize = 0;

/** Bytes for the host's arrays (never freed: the host keeps one area per thread and grows it by doubling). */
export function reserve(bytes: usize): usize {
  return heap.alloc(bytes);
}

/** Scratch bytes `bands` may use for columns of n draws: four counting rounds and a last copy. */
export function scratchBytes(n: i32): usize {
  return <usize>(MAX_ROUNDS + 1) * (<usize>n * 8 + <usize>(MAX_BUCKETS + 1) * 4 + 512) + 512;
}

// @ts-ignore: decorator
@inline function take(bytes: usize): usize {
  const at = top;
  top += (bytes + 7) & ~<usize>7;
  return at;
}

/**
 * Bands of `count` columns of n draws each, column c at `data + c·n·8`: writes [median, low, high,
 * mean] of column c at `out + 32c`. `scratch` has scratchBytes(n) bytes. Columns must be free of NaN.
 */
export function bands(data: usize, n: i32, count: i32, level: f64, out: usize, scratch: usize): void {
  top = scratch;
  const tail = (1 - level) / 2;
  const ranks = take(6 * 4);
  const values = take(6 * 8);
  for (let c = 0; c < count; c++) {
    const column = data + (<usize>c * <usize>n << 3);
    let sum: f64 = 0;
    let min: f64 = Infinity;
    let max: f64 = -Infinity;
    for (let i = 0; i < n; i++) {
      const x = load<f64>(column + (<usize>i << 3));
      sum += x;
      if (x < min) min = x;
      if (x > max) max = x;
    }
    const pLow = tail;
    const pHigh = 1 - tail;
    // The wanted ranks: each probability's ⌊(n − 1)p⌋ and the one above it, distinct and increasing.
    let count6 = 0;
    count6 = addRank(ranks, count6, below(pLow, n));
    count6 = addRank(ranks, count6, below(0.5, n));
    count6 = addRank(ranks, count6, below(pHigh, n));
    if (pLow > 0 && pLow < 1 && n > 1) count6 = addRank(ranks, count6, min32(below(pLow, n) + 1, n - 1));
    if (n > 1) count6 = addRank(ranks, count6, min32(below(0.5, n) + 1, n - 1));
    if (pHigh > 0 && pHigh < 1 && n > 1) count6 = addRank(ranks, count6, min32(below(pHigh, n) + 1, n - 1));
    statistics(column, n, ranks, count6, min, max, 0, values);
    const o = out + (<usize>c << 5);
    store<f64>(o, quantile(0.5, n, ranks, count6, values));
    store<f64>(o, quantile(pLow, n, ranks, count6, values), 8);
    store<f64>(o, quantile(pHigh, n, ranks, count6, values), 16);
    store<f64>(o, sum / <f64>n, 24);
  }
}

// @ts-ignore: decorator
@inline function min32(a: i32, b: i32): i32 {
  return a < b ? a : b;
}

/** The order statistic below probability p: type 7's i = ⌊(n − 1)p⌋, 0 for p ≤ 0 or n = 1, n − 1 for p ≥ 1. */
function below(p: f64, n: i32): i32 {
  return p <= 0 || n < 2 ? 0 : p >= 1 ? n - 1 : <i32>Math.floor(<f64>(n - 1) * p);
}

/** Insert rank r into the increasing, distinct ranks[0 … count); returns the new count. */
function addRank(ranks: usize, count: i32, r: i32): i32 {
  let j = count;
  for (let i = 0; i < count; i++) {
    const q = load<i32>(ranks + (<usize>i << 2));
    if (q == r) return count;
  }
  while (j > 0 && load<i32>(ranks + (<usize>(j - 1) << 2)) > r) {
    store<i32>(ranks + (<usize>j << 2), load<i32>(ranks + (<usize>(j - 1) << 2)));
    j--;
  }
  store<i32>(ranks + (<usize>j << 2), r);
  return count + 1;
}

/** values[index of rank r in ranks]. */
function at(r: i32, ranks: usize, count: i32, values: usize): f64 {
  for (let i = 0; i < count; i++) if (load<i32>(ranks + (<usize>i << 2)) == r) return load<f64>(values + (<usize>i << 3));
  return NaN;
}

/**
 * The type-7 quantile at p as d3-array's `quantileSorted` computes it: x₍ᵢ₎ + (x₍ᵢ₊₁₎ − x₍ᵢ₎)·(h − i)
 * with h = (n − 1)p, the upper order statistic clamped to the largest (src/engine/quantiles.ts).
 */
function quantile(p: f64, n: i32, ranks: usize, count: i32, values: usize): f64 {
  const i = below(p, n);
  if (p <= 0 || p >= 1 || n < 2) return at(i, ranks, count, values);
  const v0 = at(i, ranks, count, values);
  return v0 + (at(min32(i + 1, n - 1), ranks, count, values) - v0) * (<f64>(n - 1) * p - <f64>i);
}

/** a before b in the order a typed-array sort gives: numeric, and −0 before +0. */
// @ts-ignore: decorator
@inline function before(a: f64, b: f64): bool {
  return a < b || (a == b && (reinterpret<i64>(a) < 0) && (reinterpret<i64>(b) >= 0));
}

/**
 * The order statistics of the n values at `v` at the `count` increasing, distinct ranks at `ranks`
 * (i32), written to `out` (f64) in the ranks' order, without reordering the values. `min` and `max`
 * are their smallest and largest (found with < and >).
 */
function statistics(v: usize, n: i32, ranks: usize, count: i32, min: f64, max: f64, round: i32, out: usize): void {
  const mark = top;
  if (n <= SORT_AT_MOST) {
    // Insertion sort of a copy in the typed-array order.
    const a = take(<usize>n << 3);
    for (let i = 0; i < n; i++) {
      const x = load<f64>(v + (<usize>i << 3));
      let j = i;
      while (j > 0 && before(x, load<f64>(a + (<usize>(j - 1) << 3)))) {
        store<f64>(a + (<usize>j << 3), load<f64>(a + (<usize>(j - 1) << 3)));
        j--;
      }
      store<f64>(a + (<usize>j << 3), x);
    }
    for (let r = 0; r < count; r++) store<f64>(out + (<usize>r << 3), load<f64>(a + (<usize>load<i32>(ranks + (<usize>r << 2)) << 3)));
    top = mark;
    return;
  }
  if (min == max) {
    for (let r = 0; r < count; r++) store<f64>(out + (<usize>r << 3), min);
    return;
  }
  const buckets = min32(MAX_BUCKETS, n >> 3);
  const scale = <f64>buckets / (max - min);
  // An infinite range (±Infinity among the values, or max − min overflowing) or a range so narrow
  // that its width is subnormal cannot be cut into buckets.
  if (!(scale > 0 && scale < Infinity) || round >= MAX_ROUNDS) {
    selected(v, n, ranks, count, out);
    return;
  }

  // Buckets 0 … B: (x − min)·scale can round up to B itself at x = max, so B gets its own bucket.
  const counts = take(<usize>(buckets + 1) << 2);
  memory.fill(counts, 0, <usize>(buckets + 1) << 2);
  for (let i = 0; i < n; i++) {
    const b = counts + (<usize><i32>((load<f64>(v + (<usize>i << 3)) - min) * scale) << 2);
    store<i32>(b, load<i32>(b) + 1);
  }

  // Which bucket holds each rank (`where`: its index among the wanted buckets), and its rank inside that bucket.
  const wanted = take(6 * 4);
  const sizes = take(6 * 4);
  const where = take(6 * 4);
  const inner = take(6 * 4);
  let nWanted = 0;
  let under = 0;
  for (let b = 0, r = 0; r < count; b++) {
    const c = load<i32>(counts + (<usize>b << 2));
    while (r < count && load<i32>(ranks + (<usize>r << 2)) < under + c) {
      if (nWanted == 0 || load<i32>(wanted + (<usize>(nWanted - 1) << 2)) != b) {
        store<i32>(wanted + (<usize>nWanted << 2), b);
        store<i32>(sizes + (<usize>nWanted << 2), c);
        nWanted++;
      }
      store<i32>(where + (<usize>r << 2), nWanted - 1);
      store<i32>(inner + (<usize>r << 2), load<i32>(ranks + (<usize>r << 2)) - under);
      r++;
    }
    under += c;
  }

  // Copy out the wanted buckets, each to its own run of `gathered`, noting each run's range.
  memory.fill(counts, 0xff, <usize>(buckets + 1) << 2);
  const cursor = take(6 * 4);
  const low = take(6 * 8);
  const high = take(6 * 8);
  let total = 0;
  for (let w = 0; w < nWanted; w++) {
    store<i32>(counts + (<usize>load<i32>(wanted + (<usize>w << 2)) << 2), w);
    store<i32>(cursor + (<usize>w << 2), total);
    store<f64>(low + (<usize>w << 3), Infinity);
    store<f64>(high + (<usize>w << 3), -Infinity);
    total += load<i32>(sizes + (<usize>w << 2));
  }
  const gathered = take(<usize>total << 3);
  for (let i = 0; i < n; i++) {
    const x = load<f64>(v + (<usize>i << 3));
    const w = load<i32>(counts + (<usize><i32>((x - min) * scale) << 2));
    if (w >= 0) {
      const cw = cursor + (<usize>w << 2);
      const k = load<i32>(cw);
      store<f64>(gathered + (<usize>k << 3), x);
      store<i32>(cw, k + 1);
      const lw = low + (<usize>w << 3);
      const hw = high + (<usize>w << 3);
      if (x < load<f64>(lw)) store<f64>(lw, x);
      if (x > load<f64>(hw)) store<f64>(hw, x);
    }
  }

  // Each wanted bucket's ranks, searched for in its run.
  const members = take(6 * 4);
  const subRanks = take(6 * 4);
  const found = take(6 * 8);
  for (let w = 0, start = 0; w < nWanted; start += load<i32>(sizes + (<usize>w << 2)), w++) {
    let m = 0;
    for (let r = 0; r < count; r++) {
      if (load<i32>(where + (<usize>r << 2)) == w) {
        store<i32>(members + (<usize>m << 2), r);
        store<i32>(subRanks + (<usize>m << 2), load<i32>(inner + (<usize>r << 2)));
        m++;
      }
    }
    statistics(gathered + (<usize>start << 3), load<i32>(sizes + (<usize>w << 2)), subRanks, m,
      load<f64>(low + (<usize>w << 3)), load<f64>(high + (<usize>w << 3)), round + 1, found);
    for (let j = 0; j < m; j++) {
      store<f64>(out + (<usize>load<i32>(members + (<usize>j << 2)) << 3), load<f64>(found + (<usize>j << 3)));
    }
  }
  top = mark;
}

/** Hoare's selection rank by rank on a copy, each search starting where the last one ended. */
function selected(v: usize, n: i32, ranks: usize, count: i32, out: usize): void {
  const mark = top;
  const a = take(<usize>n << 3);
  memory.copy(a, v, <usize>n << 3);
  let from = 0;
  for (let r = 0; r < count; r++) {
    const k = load<i32>(ranks + (<usize>r << 2));
    select(a, k, from, n - 1);
    from = k;
    store<f64>(out + (<usize>r << 3), load<f64>(a + (<usize>k << 3)));
  }
  top = mark;
}

/**
 * Hoare's selection (quickselect, Hoare 1961) with a median-of-three pivot, as src/engine/select.ts
 * had it: afterwards a[k] holds the k-th smallest of a[lo … hi].
 */
function select(a: usize, k: i32, lo: i32, hi: i32): void {
  while (hi > lo) {
    const x = load<f64>(a + (<usize>lo << 3));
    const y = load<f64>(a + (<usize>((lo + hi) >> 1) << 3));
    const z = load<f64>(a + (<usize>hi << 3));
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (load<f64>(a + (<usize>i << 3)) < pivot) i++;
      while (load<f64>(a + (<usize>j << 3)) > pivot) j--;
      if (i <= j) {
        const t = load<f64>(a + (<usize>i << 3));
        store<f64>(a + (<usize>i << 3), load<f64>(a + (<usize>j << 3)));
        store<f64>(a + (<usize>j << 3), t);
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}
