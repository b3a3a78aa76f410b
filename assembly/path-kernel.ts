import { i32At, f64At, setF64, addF64 } from './memory-access';
/**
 * The true paths of one sweep of the observer-error sampler in WebAssembly (AssemblyScript,
 * compiled by `npm run build` through scripts/build-wasm.mjs into src/uncertainty/path-kernel-wasm.ts):
 * the forward filter of every record prefix, then the backward draws of every one-site record pattern.
 *
 * Why: profiled with `node --cpu-prof` at the `observer` bench's size (10,000 sites × 12 surveys × 8
 * states, 3,000–4,000 sweeps), the sweep was the forward filter's multiply-adds (~45%), the
 * backward draws (~30%) and the uniforms (~11%): small loops over k whose bounds checks, property
 * loads and 32-bit-halves xoshiro256** cost more than the arithmetic (DEVELOPERS.md, Benchmarks).
 * In this module, timed one export at a time at that size (CPU, best of 20-call blocks, the machine
 * loaded): the backward draws are about two thirds of a sweep (`paths` ~5–6 ms), the forward filter
 * about one third (~2.8 ms before its prediction was made in f64x2 below, ~2.35 ms after); the
 * Dirichlet draws and copies on the host are ~1%. The draws are a chain of dependent steps (each
 * state drawn decides the next step's weights, and each trial a division and a uniform), which
 * SIMD cannot shorten without changing the numbers: precomputing every trial's chance before the
 * first uniform was tried and was slower. The filter is made pattern by pattern just before the
 * pattern's draws (filterTo), so that its laws are read back from cache.
 *
 * The numbers are those of the JavaScript sampler, bit for bit (test/uncertainty/path-kernel.test.ts):
 * the forward filter is src/uncertainty/error-sampler.ts's forwardFilter, computed once per distinct
 * record prefix (two sites with the same records up to step t have the same filtered law at t); the
 * backward draws are src/uncertainty/one-path.ts's, each categorical draw categorical.ts's
 * sequential Bernoulli trials; the uniforms are the chain stream's own xoshiro256** (Blackman &
 * Vigna 2021; src/uncertainty/xoshiro.ts) with native 64-bit words, from a block both this module
 * and the host read with one shared position, so the host's Dirichlet and multinomial draws take
 * the next uniforms exactly where the paths left off. +, −, ×, ÷ are correctly rounded IEEE 754
 * operations in both, and nothing is fused or reordered.
 *
 * Memory is laid out by the host (src/uncertainty/path-kernel.ts); this module only computes.
 */

/** The stream's xoshiro256** state (the host starts it from the chain stream's key). */
let s0: u64 = 0;
let s1: u64 = 0;
let s2: u64 = 0;
let s3: u64 = 0;

let K: i32 = 0;
/** Byte offsets of the host's arrays (f64 unless said): see the host for each. */
let blockAt: usize = 0;
let pTAt: usize = 0;
let pAt: usize = 0;
let pLastAt: usize = 0; // i32
let emitAt: usize = 0;
let emitSupportAt: usize = 0; // i32
let emitCountAt: usize = 0; // i32
let piAt: usize = 0;
let weightsAt: usize = 0;
let nodeCount: i32 = 0;
let parentAt: usize = 0; // i32
let columnAt: usize = 0; // i32, −1: not surveyed
let filterAt: usize = 0;
let supportAt: usize = 0; // i32
let supportCountAt: usize = 0; // i32
let patternCount: i32 = 0;
let singleAt: usize = 0; // i32: 1 for a pattern of one site
let startAt: usize = 0; // i32
let atAt: usize = 0; // i32
let recordedAt: usize = 0; // i32: matrix · k² + recorded state, per survey
let extendAt: usize = 0; // i32
let nodeStartAt: usize = 0; // i32: pattern q's steps are nodeOf[nodeStart[q] …]
let nodeOfAt: usize = 0; // i32
let transitionsAt: usize = 0;
let recordedCountsAt: usize = 0;
let firstAt: usize = 0;
let latestAt: usize = 0;

/** Where the next uniform of the block is (BLOCK: used up); read back by the host after `paths`. */
let position: i32 = 0;
const BLOCK: i32 = 256;

export function reserve(bytes: usize): usize {
  return heap.alloc(bytes);
}

export function setStream(a: u64, b: u64, c: u64, d: u64): void {
  s0 = a;
  s1 = b;
  s2 = c;
  s3 = d;
}

export function setLayout(states: i32, block: usize, pT: usize, p: usize, pLast: usize, emit: usize, emitSupport: usize,
  emitCount: usize, pi: usize, weights: usize): void {
  K = states;
  blockAt = block;
  pTAt = pT;
  pAt = p;
  pLastAt = pLast;
  emitAt = emit;
  emitSupportAt = emitSupport;
  emitCountAt = emitCount;
  piAt = pi;
  weightsAt = weights;
}

export function setPrefixes(count: i32, parent: usize, column: usize, filter: usize, support: usize, supportCount: usize): void {
  nodeCount = count;
  parentAt = parent;
  columnAt = column;
  filterAt = filter;
  supportAt = support;
  supportCountAt = supportCount;
}

export function setPatterns(count: i32, single: usize, start: usize, at: usize, recorded: usize, extend: usize,
  nodeStart: usize, nodeOf: usize): void {
  patternCount = count;
  singleAt = single;
  startAt = start;
  atAt = at;
  recordedAt = recorded;
  extendAt = extend;
  nodeStartAt = nodeStart;
  nodeOfAt = nodeOf;
}

export function setOutputs(transitions: usize, recorded: usize, first: usize, latest: usize): void {
  transitionsAt = transitions;
  recordedCountsAt = recorded;
  firstAt = first;
  latestAt = latest;
}

/** Fill the block with the next BLOCK uniforms of the stream (xoshiro.ts: the top 53 bits · 2⁻⁵³). */
export function refill(): void {
  const block = blockAt;
  let a = s0, b = s1, c = s2, d = s3;
  for (let n = 0; n < BLOCK; n++) {
    const result = rotl<u64>(b * 5, 7) * 9;
    store<f64>(block + (<usize>n << 3), <f64>(result >> 11) * 1.1102230246251565e-16);
    const t = b << 17;
    c ^= a;
    d ^= b;
    b ^= c;
    a ^= d;
    c ^= t;
    d = rotl<u64>(d, 45);
  }
  s0 = a;
  s1 = b;
  s2 = c;
  s3 = d;
}

// @ts-ignore: decorator
@inline function uniform(): f64 {
  let at = position;
  if (at == BLOCK) {
    refill();
    at = 0;
  }
  position = at + 1;
  return load<f64>(blockAt + (<usize>at << 3));
}

/** categorical.ts drawCategorical over w[offset … offset+count): the same trials, the same uniforms. */
// @ts-ignore: decorator
@inline function categorical(w: usize, offset: i32, count: i32): i32 {
  let mass = 1.0;
  const last = count - 1;
  let drawn = last;
  for (let j = 0; j < last; j++) {
    const pj = f64At(w, offset + j);
    if (pj >= mass) {
      drawn = j;
      break;
    }
    if (pj > 0) {
      const chance = pj / mass;
      if (chance >= 1 || uniform() < chance) {
        drawn = j;
        break;
      }
    }
    mass -= pj;
  }
  return drawn;
}

/**
 * The one-step prediction of a prefix from its parent's filtered law, v[x] = Σ_j α̂(a_j)·P[a_j, x] over
 * the parent's positive states a_j in ascending order, for every x, into out[0 … k). forwardFilter
 * sums over a for each x in turn (x outside, a inside); here a is outside and x inside, eight x at a
 * time in four f64x2 accumulators (then two, then one), so that the k sums run side by side instead of
 * one dependent chain after another. Every v[x] is still +0 plus the same products (one IEEE multiply
 * of α̂(a)·P[a, x], then one add; nothing fused) in the same order of a, so the bits are the same.
 * P untransposed: the x of row a are contiguous.
 */
// @ts-ignore: decorator
@inline function predict(k: i32, p: usize, parentRow: usize, supportRow: usize, previous: i32, out: usize): void {
  const stride = <usize>k << 3;
  let x = 0;
  for (; x + 8 <= k; x += 8) {
    const column = p + (<usize>x << 3);
    let v0 = f64x2.splat(0);
    let v1 = v0, v2 = v0, v3 = v0;
    for (let j = 0; j < previous; j++) {
      const a = <usize>load<i32>(supportRow + (<usize>j << 2));
      const f = f64x2.splat(load<f64>(parentRow + (a << 3)));
      const at = column + a * stride;
      v0 = f64x2.add(v0, f64x2.mul(f, v128.load(at)));
      v1 = f64x2.add(v1, f64x2.mul(f, v128.load(at, 16)));
      v2 = f64x2.add(v2, f64x2.mul(f, v128.load(at, 32)));
      v3 = f64x2.add(v3, f64x2.mul(f, v128.load(at, 48)));
    }
    const o = out + (<usize>x << 3);
    v128.store(o, v0);
    v128.store(o, v1, 16);
    v128.store(o, v2, 32);
    v128.store(o, v3, 48);
  }
  for (; x + 2 <= k; x += 2) {
    const column = p + (<usize>x << 3);
    let v = f64x2.splat(0);
    for (let j = 0; j < previous; j++) {
      const a = <usize>load<i32>(supportRow + (<usize>j << 2));
      v = f64x2.add(v, f64x2.mul(f64x2.splat(load<f64>(parentRow + (a << 3))), v128.load(column + a * stride)));
    }
    v128.store(out + (<usize>x << 3), v);
  }
  if (x < k) {
    const column = p + (<usize>x << 3);
    let v = 0.0;
    for (let j = 0; j < previous; j++) {
      const a = <usize>load<i32>(supportRow + (<usize>j << 2));
      v += load<f64>(parentRow + (a << 3)) * load<f64>(column + a * stride);
    }
    store<f64>(out + (<usize>x << 3), v);
  }
}

/** How many prefixes (from the first) have their filtered law this sweep: `paths` makes them as it needs them. */
let filtered: i32 = 0;

/** A new sweep: every prefix's law to be made again (from this sweep's P, E and π). */
export function startSweep(): void {
  filtered = 0;
}

/**
 * The filtered law of the record prefixes from `filtered` to `end` (exclusive), in order (a
 * prefix's parent comes before it), as error-sampler.ts forwardFilter computes each step. Returns
 * −1, or the first prefix whose law has no mass (the host throws forwardFilter's error).
 */
function filterTo(end: i32): i32 {
  // The globals in locals: V8 keeps a module's mutable globals in memory (year-kernel.ts).
  const k = K, parent = parentAt, column = columnAt, emitCount = emitCountAt, emitSupport = emitSupportAt;
  const supportCount = supportCountAt, filter = filterAt, support = supportAt, pi = piAt, p = pAt, emit = emitAt;
  const from = filtered;
  filtered = end;
  for (let n = from; n < end; n++) {
    const up = i32At(parent, n);
    const col = i32At(column, n);
    const row = n * k;
    const surveyed = col >= 0;
    const base = col * k;
    const count = surveyed ? i32At(emitCount, col) : k;
    let total = 0.0;
    // The first step, from π; a later one, from the parent prefix by predict (then the emission at a survey).
    if (up < 0) {
      for (let x = 0; x < k; x++) setF64(filter, row + x, 0);
      for (let i = 0; i < count; i++) {
        const x = surveyed ? i32At(emitSupport, base + i) : i;
        let v = f64At(pi, x);
        if (surveyed) v *= f64At(emit, base + x);
        setF64(filter, row + x, v);
        total += v;
      }
    } else {
      const before = up * k;
      const out = filter + (<usize>row << 3);
      predict(k, p, filter + (<usize>before << 3), support + (<usize>before << 2), i32At(supportCount, up), out);
      if (surveyed) {
        // The emission, for every x at once: v·E[x, r] + 0. On E's support that is v·E[x, r] (v ≥ 0, so
        // v·E[x, r] is never −0, and y + 0 = y); elsewhere E[x, r] is ±0 and v·(±0) + 0 = +0, the 0
        // forwardFilter leaves there.
        const column = emit + (<usize>base << 3);
        const zero = f64x2.splat(0);
        let x = 0;
        for (; x + 2 <= k; x += 2) {
          const at = out + (<usize>x << 3);
          v128.store(at, f64x2.add(f64x2.mul(v128.load(at), v128.load(column + (<usize>x << 3))), zero));
        }
        if (x < k) setF64(filter, row + x, f64At(filter, row + x) * f64At(column, x) + 0.0);
      }
      // The total over the same x in the same order as forwardFilter.
      for (let i = 0; i < count; i++) total += f64At(filter, row + (surveyed ? i32At(emitSupport, base + i) : i));
    }
    if (!(total > 0)) return n;
    let positive = 0;
    for (let i = 0; i < count; i++) {
      const x = surveyed ? i32At(emitSupport, base + i) : i;
      const v = f64At(filter, row + x) / total;
      setF64(filter, row + x, v);
      if (v > 0) {
        store<i32>(support + (<usize>(row + positive) << 2), x);
        positive++;
      }
    }
    store<i32>(supportCount + (<usize>n << 2), positive);
  }
  return -1;
}

/**
 * The backward draws of one-path.ts for patterns from `from` on, while they are of one site;
 * returns the first pattern of several sites (the host draws it, its laws made), the pattern count, or −1
 * when a prefix's law has no mass (the host throws forwardFilter's error). Each pattern's prefixes are
 * filtered (filterTo) just before its draws.
 * `blockPosition`: the uniforms' position in the block on entry; read it back with `uniformPosition`.
 */
export function paths(from: i32, blockPosition: i32): i32 {
  position = blockPosition;
  const k = K, filter = filterAt, support = supportAt, supportCount = supportCountAt, pT = pTAt, p = pAt, pLast = pLastAt;
  const weights = weightsAt, single = singleAt, start = startAt, at = atAt, recorded = recordedAt, extend = extendAt;
  const nodeStart = nodeStartAt, nodeOf = nodeOfAt, transitions = transitionsAt, recordedCounts = recordedCountsAt;
  const patterns = patternCount;
  for (let q = from; q < patterns; q++) {
    // Pattern q's prefixes filtered first (its deepest step has the largest number of them,
    // chain/record-prefixes.ts), so that most laws are made just before the draws that read them, while
    // they are still in cache; each once a sweep, in the same order as before.
    const deepest = i32At(nodeOf, i32At(nodeStart, q + 1) - 1);
    if (deepest >= filtered && filterTo(deepest + 1) >= 0) return -1;
    if (i32At(single, q) == 0) return q;
    const firstSurvey = i32At(start, q);
    const steps0 = i32At(nodeStart, q);
    const lastSurvey = i32At(start, q + 1) - 1;
    const T = i32At(at, lastSurvey) + 1;
    const lastNode = i32At(nodeOf, steps0 + T - 1);
    const lastRow = lastNode * k;
    let b = categorical(filter, lastRow, i32At(support, lastRow + i32At(supportCount, lastNode) - 1) + 1);
    const steps = i32At(extend, q);
    if (steps >= 0) {
      let now = b;
      for (let t = 0; t < steps; t++) {
        const after = categorical(p, now * k, i32At(pLast, now) + 1);
        addF64(transitions, now * k + after, 1);
        now = after;
      }
      addF64(latestAt, now, 1);
    }
    let s = lastSurvey;
    for (let t = T - 1; ; t--) {
      if (s >= firstSurvey && i32At(at, s) == t) {
        addF64(recordedCounts, i32At(recorded, s) + b * k, 1);
        s -= 1;
      }
      if (t == 0) break;
      // The weights α̂_{t−1}(a)·P[a, b] over the positive states of α̂_{t−1} only (the others are 0·P[a, b]
      // = 0, which adds nothing to the total and which the draw passes over while mass is left),
      // kept by their place i in the support.
      const node = i32At(nodeOf, steps0 + t - 1);
      const row = node * k;
      const n = i32At(supportCount, node);
      const col = b * k;
      let total = 0.0;
      for (let i = 0; i < n; i++) {
        const a = i32At(support, row + i);
        const w = f64At(filter, row + a) * f64At(pT, col + a);
        setF64(weights, i, w);
        total += w;
      }
      // The last state whose share is positive (one-path.ts: 0 when none).
      let lastI = -1;
      for (let i = n - 1; i >= 0; i--) {
        const w = f64At(weights, i);
        if (w > 0 && w / total > 0) {
          lastI = i;
          break;
        }
      }
      const last = lastI < 0 ? 0 : i32At(support, row + lastI);
      let drawn = last;
      let mass = 1.0;
      // The first state after the previous one visited: a share of 0 there is taken when no mass is left (0 ≥ mass).
      let gap = 0;
      let placed = false;
      for (let i = 0; i < lastI; i++) {
        const a = i32At(support, row + i);
        if (a > gap && mass <= 0) {
          drawn = gap;
          placed = true;
          break;
        }
        const w = f64At(weights, i) / total;
        if (w >= mass) {
          drawn = a;
          placed = true;
          break;
        }
        if (w > 0) {
          const chance = w / mass;
          if (chance >= 1 || uniform() < chance) {
            drawn = a;
            placed = true;
            break;
          }
        }
        mass -= w;
        gap = a + 1;
      }
      if (!placed && last > gap && mass <= 0) drawn = gap;
      addF64(transitions, drawn * k + b, 1);
      b = drawn;
    }
    addF64(firstAt, b, 1);
  }
  return patterns;
}

/** The uniforms' position in the block after `paths`. */
export function uniformPosition(): i32 {
  return position;
}
