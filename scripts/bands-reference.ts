/**
 * The bands in JavaScript: the reference the WebAssembly band kernel (assembly/band-kernel.ts) is
 * held to, bit for bit (test/engine/band-kernel.test.ts), and the bench's warm JavaScript timing
 * (`npm run bench -- bands`). The engine computed its bands with this code until the kernel took
 * over (DEVELOPERS.md, Benchmarks: in a fresh process it ran mostly before V8 had optimised it).
 */

/** Columns this short are sorted outright: a typed-array sort beats counting on a few dozen values. */
const SORT_AT_MOST = 64;
/** Buckets per counting round: one per 8 values, at most this many (8 KB of counts, in L1 cache). */
const MAX_BUCKETS = 2048;
/** Counting rounds before a bucket that stays crowded (values piled near one point) goes to Hoare selection. */
const MAX_ROUNDS = 4;

/**
 * The order statistics of `values` at the 0-based `ranks` (increasing, distinct, each below
 * `values.length`), exactly — the numbers a sort would put at those places — without reordering
 * `values`. `min` and `max` are its smallest and largest values (the caller's pass over the column
 * finds them with the sum). Input must be free of NaN.
 *
 * Method: selection by distributive partitioning (Allison & Noga 1980, after Dobosiewicz's 1978
 * distributive sort). One pass counts the values in B equal-width buckets over [min, max]; a
 * second pass copies out only the few buckets holding a wanted rank, and the search continues in
 * those (a few hundred values at 100,000 draws), by the same method, by sorting once they are
 * short, or by Hoare's selection if the range is not finite or a bucket stays crowded. The bucket
 * index ⌊(x − min)·B/(max − min)⌋ never decreases as x grows — floating-point subtraction and
 * multiplication by a positive number round monotonically — so no value lands in a lower bucket
 * than a smaller value, and the j-th value overall is the (j − values in lower buckets)-th of its
 * bucket: the result is exact, not binned. All wanted ranks of a column share the two passes.
 *
 * Why, measured (`npm run bench -- bands`: the three quantiles of 101 years × 10 states = 1,010
 * columns of 100,000 Beta-distributed shares, each copied to a scratch array first as the forecast
 * does; alternating runs, best of 5, on a loaded 2-core machine): 0.73–1.05 s against 4.6–6.3 s
 * for Hoare selection rank by rank, 4.4–8.4× faster. The counting pass has no data-dependent
 * branch, where partitioning mispredicts about every other comparison, and the column is read
 * twice in all instead of several times per rank (the old way also rescanned everything above
 * each rank for its upper neighbour).
 */
export function orderStatistics(values: Float64Array, ranks: readonly number[], min: number, max: number): number[] {
  return statistics(values, Int32Array.from(ranks), min, max, 0);
}

/**
 * The ranks travel as an Int32Array: as plain arrays they came from two places with different
 * element kinds, and V8 threw away the optimised code of this function hundreds of times a run
 * ("wrong map"), so a forecast's bands ran mostly unoptimised (measured: 255 columns of 4,000
 * draws, the demo's, took 110–210 ms in a fresh process against 16 ms once warm).
 */
function statistics(values: Float64Array, ranks: Int32Array, min: number, max: number, round: number): number[] {
  const n = values.length;
  if (n <= SORT_AT_MOST) {
    const sorted = values.slice().sort();
    return Array.from(ranks, (r) => sorted[r]!);
  }
  if (min === max) return Array.from(ranks, () => min);
  const buckets = Math.min(MAX_BUCKETS, n >> 3);
  const scale = buckets / (max - min);
  // An infinite range (±Infinity among the values, or max − min overflowing) or a range so narrow
  // that its width is subnormal cannot be cut into buckets.
  if (!(scale > 0 && scale < Infinity) || round >= MAX_ROUNDS) return selected(values, ranks);

  // Buckets 0 … B: (x − min)·scale can round up to B itself at x = max, so B gets its own bucket.
  const counts = new Int32Array(buckets + 1);
  for (let i = 0; i < n; i++) counts[((values[i]! - min) * scale) | 0]++;

  // Which bucket holds each rank, and its rank inside that bucket.
  const wanted: number[] = [];
  const sizes: number[] = [];
  const where = new Int32Array(ranks.length);
  const inner = new Int32Array(ranks.length);
  let below = 0;
  for (let b = 0, r = 0; r < ranks.length; b++) {
    const c = counts[b]!;
    while (r < ranks.length && ranks[r]! < below + c) {
      if (wanted[wanted.length - 1] !== b) { wanted.push(b); sizes.push(c); }
      where[r] = wanted.length - 1;
      inner[r] = ranks[r]! - below;
      r++;
    }
    below += c;
  }

  // Copy out the wanted buckets, each to its own run of `gathered`, noting each run's range.
  counts.fill(-1);
  const cursor = new Int32Array(wanted.length);
  const low = new Float64Array(wanted.length).fill(Infinity);
  const high = new Float64Array(wanted.length).fill(-Infinity);
  let total = 0;
  for (let w = 0; w < wanted.length; w++) {
    counts[wanted[w]!] = w;
    cursor[w] = total;
    total += sizes[w]!;
  }
  const gathered = new Float64Array(total);
  for (let i = 0; i < n; i++) {
    const x = values[i]!;
    const w = counts[((x - min) * scale) | 0]!;
    if (w >= 0) {
      gathered[cursor[w]++] = x;
      if (x < low[w]!) low[w] = x;
      if (x > high[w]!) high[w] = x;
    }
  }

  const out = new Array<number>(ranks.length);
  for (let w = 0, start = 0; w < wanted.length; start += sizes[w]!, w++) {
    const members: number[] = [];
    for (let r = 0; r < ranks.length; r++) if (where[r] === w) members.push(r);
    const found = statistics(gathered.subarray(start, start + sizes[w]!), Int32Array.from(members, (r) => inner[r]!), low[w]!, high[w]!, round + 1);
    members.forEach((r, m) => { out[r] = found[m]!; });
  }
  return out;
}

/** Hoare's selection rank by rank on a copy, each search starting where the last one ended. */
function selected(values: Float64Array, ranks: Int32Array): number[] {
  const a = values.slice();
  let from = 0;
  return Array.from(ranks, (r) => {
    select(a, r, from, a.length - 1);
    from = r;
    return a[r]!;
  });
}

/**
 * Hoare's selection (quickselect, Hoare 1961) with a median-of-three pivot: afterwards a[k] holds
 * the k-th smallest of a[lo…hi], everything before it is ≤ and everything after is ≥.
 *
 * The order statistics above use it only where bucket counting cannot narrow a column: a value
 * range that is not finite, or buckets that stay crowded after a few rounds. It used to select
 * every band directly (measured 2× faster than sorting); bucket counting replaced that.
 */
export function select(a: Float64Array, k: number, lo: number, hi: number): void {
  while (hi > lo) {
    const x = a[lo]!;
    const y = a[(lo + hi) >> 1]!;
    const z = a[hi]!;
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i]! < pivot) i++;
      while (a[j]! > pivot) j--;
      if (i <= j) {
        const t = a[i]!;
        a[i] = a[j]!;
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}

/**
 * Equal-tailed band of a sample: the (1 − level)/2, 0.5 and (1 + level)/2 quantiles by linear
 * interpolation between order statistics (Hyndman & Fan 1996, type 7 — the default of R and
 * numpy). Leaves `sample` as it was. One pass gives the sum, the smallest and the largest value;
 * the order statistics of all three quantiles then come from one bucket count (`orderStatistics`).
 */
export function bandOfReference(sample: Float64Array, level: number): { median: number; low: number; high: number; mean: number } {
  const tail = (1 - level) / 2;
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < sample.length; i++) {
    const x = sample[i]!;
    sum += x;
    if (x < min) min = x;
    if (x > max) max = x;
  }
  const [low, median, high] = type7Quantiles(sample, [tail, 0.5, 1 - tail], min, max) as [number, number, number];
  return { median, low, high, mean: sum / sample.length };
}

/**
 * Type-7 quantiles (Hyndman & Fan 1996) at each probability, computed as d3-array's
 * `quantileSorted` computes them on the sorted sample — x₍ᵢ₎ + (x₍ᵢ₊₁₎ − x₍ᵢ₎)·(h − i) with
 * h = (n − 1)p, i = ⌊h⌋; the smallest value for p ≤ 0 or n = 1, the largest for p ≥ 1 — so the
 * results are the same numbers, bit for bit (tested). `min` and `max` are the sample's extremes.
 * (Where (n − 1)p rounds up to n − 1 for some p < 1, d3 reads past the end and returns NaN; here
 * the upper order statistic is clamped to the largest value.)
 */
export function type7Quantiles(sample: Float64Array, probabilities: readonly number[], min: number, max: number): number[] {
  const n = sample.length;
  if (n === 0) throw new Error('quantiles of an empty sample');
  const below = (p: number): number => (p <= 0 || n < 2 ? 0 : p >= 1 ? n - 1 : Math.floor((n - 1) * p));
  const ranks = new Set<number>();
  for (const p of probabilities) {
    const i = below(p);
    ranks.add(i);
    if (p > 0 && p < 1 && n > 1) ranks.add(Math.min(i + 1, n - 1));
  }
  const wanted = [...ranks].sort((a, b) => a - b);
  const values = orderStatistics(sample, wanted, min, max);
  const at = (rank: number): number => values[wanted.indexOf(rank)]!;
  return probabilities.map((p) => {
    const i = below(p);
    if (p <= 0 || p >= 1 || n < 2) return at(i);
    const v0 = at(i);
    return v0 + (at(Math.min(i + 1, n - 1)) - v0) * ((n - 1) * p - i);
  });
}
