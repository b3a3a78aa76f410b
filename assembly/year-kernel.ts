/**
 * The year matrices of year-to-year variation in WebAssembly (AssemblyScript, compiled by
 * `npm run build` through scripts/build-wasm.mjs into src/uncertainty/year-kernel-wasm.ts).
 *
 * Why: with variation every draw, year and row gets a fresh Dirichlet row, one gamma variate per cell.
 * In JavaScript a xoshiro256** uniform costs about 10 ns (64-bit words as 32-bit halves); here the
 * words are native i64 (DEVELOPERS.md, Benchmarks, for the measured gain).
 *
 * The numbers are those of the JavaScript generator, bit for bit (test/uncertainty/year-kernel.test.ts):
 * the same xoshiro256** stream and 53-bit uniforms (Blackman & Vigna 2021; src/uncertainty/xoshiro.ts),
 * the same 256-strip ziggurat (Marsaglia & Tsang 2000; its tables are src/uncertainty/normal.ts's,
 * copied in by the host), the same Marsaglia & Tsang (2000) gamma with the boost exp(ln U / a) for
 * shape a < 1 (gamma.ts), the same Dirichlet redraws (dirichlet.ts) — every operation in the same
 * order, and exp and log imported from the host's Math, so no libm of our own can round differently.
 * sqrt, +, −, ×, ÷ are correctly rounded IEEE 754 operations in both.
 *
 * Where the time goes, and what was done about it (2026-12-03; DEVELOPERS.md, Benchmarks, for the
 * figures): a draw's cells are made ready once (`prepare`: the shape and Marsaglia–Tsang's d and c),
 * the gamma loop of a row is one function with the stream in locals and the ziggurat's common path
 * inline, the strip taken from the uniform's integer bits. What is left, by perf: on dense rows of
 * shapes near 5, the uniform → strip → acceptance chain itself, and the host's log for the ~5% of
 * variates the squeeze does not accept; on small shapes, the host's exp and log of the boost — about
 * half of such a variate's time. AssemblyScript's own exp/log (NativeMath) measured 1.7–1.9× on small
 * shapes and 1.1–1.4× on dense rows, but rounds differently from V8's, so every seeded forecast with
 * variation would move (not done: see DEVELOPERS.md).
 *
 * Memory is laid out by the host (src/uncertainty/year-kernel.ts); this module only computes.
 */

@external("env", "exp") declare function exp(x: f64): f64;
@external("env", "log") declare function log(x: f64): f64;

/** Ziggurat tables (normal.ts): X[0 … 256], F[0 … 256] = f(X[i]), RATIO[0 … 255] = X[i+1]/X[i]; and R. */
let xTable: usize = 0;
let fTable: usize = 0;
let ratioTable: usize = 0;
let tailStart: f64 = 0;

/** The current stream's xoshiro256** state, loaded from and stored back to the host's memory by yearMatrix. */
let s0: u64 = 0;
let s1: u64 = 0;
let s2: u64 = 0;
let s3: u64 = 0;

/** Bytes for the host's arrays (never freed: the host keeps one area per thread and grows it by doubling). */
export function reserve(bytes: usize): usize {
  return heap.alloc(bytes);
}

export function setTables(x: usize, f: usize, ratio: usize, r: f64): void {
  xTable = x;
  fTable = f;
  ratioTable = ratio;
  tailStart = r;
}

/** The next 64-bit output of the stream held in the globals: xoshiro256**, result = rotl(s1 · 5, 7) · 9, then the linear step. */
// @ts-ignore: decorator
@inline function next(): u64 {
  const result = rotl<u64>(s1 * 5, 7) * 9;
  const t = s1 << 17;
  s2 ^= s0;
  s3 ^= s1;
  s1 ^= s2;
  s0 ^= s3;
  s2 ^= t;
  s3 = rotl<u64>(s3, 45);
  return result;
}

/** A uniform on [0, 1): the top 53 bits · 2⁻⁵³ (xoshiro.ts). */
// @ts-ignore: decorator
@inline function uniform(): f64 {
  return <f64>(next() >> 11) * 1.1102230246251565e-16;
}

/**
 * A standard normal by the ziggurat, as normal.ts: strip, sign and position from one uniform
 * U = m·2⁻⁵³ (m the top 53 bits). normal.ts takes V = 512·U, strip-and-sign b = ⌊V⌋ and position
 * V − b; both are exact in doubles and equal m >> 44 and (m mod 2⁴⁴)·2⁻⁴⁴, which is how they are
 * taken here: a float-to-integer conversion in WebAssembly traps when out of range, and the check
 * V8 makes for it (round, convert, convert back, compare) was a third of a normal's time (perf).
 */
function normal(): f64 {
  while (true) {
    const m = next() >> 11;
    const x = strip(m);
    if (x == x) return x;
    const y = wedgeOrTail(m);
    if (y == y) return y;
  }
}

/** The strip's point when it lies under the strip above (about 99% of draws), else NaN. */
// @ts-ignore: decorator
@inline function strip(m: u64): f64 {
  const b = <i32>(m >> 44);
  const i = b >> 1;
  const u = <f64>(m & 0xFFFFFFFFFFF) * 5.684341886080802e-14; // 2⁻⁴⁴
  const z = u * load<f64>(xTable + (<usize>i << 3));
  // The sign by flipping the sign bit (exactly −z): a branch on the random sign bit is mispredicted
  // half the time (a normal took 11.2 ns so, and with a wasm select 11.1; now 5.7: DEVELOPERS.md).
  const sign = <u64>(b & 1) << 63;
  return u < load<f64>(ratioTable + (<usize>i << 3)) ? reinterpret<f64>(reinterpret<u64>(z) ^ sign) : NaN;
}

/** The rest of the ziggurat for a point outside the strip above (normal.ts): the tail or the wedge; NaN when rejected. */
function wedgeOrTail(m: u64): f64 {
  const b = <i32>(m >> 44);
  const i = b >> 1;
  const u = <f64>(m & 0xFFFFFFFFFFF) * 5.684341886080802e-14;
  const sign = <u64>(b & 1) << 63;
  if (i == 0) {
    // The tail beyond R (Marsaglia 1964).
    let a: f64;
    let e: f64;
    do {
      a = -log(1 - uniform()) / tailStart;
      e = -log(1 - uniform());
    } while (e + e < a * a);
    return reinterpret<f64>(reinterpret<u64>(tailStart + a) ^ sign);
  }
  const z = u * load<f64>(xTable + (<usize>i << 3));
  const fi = load<f64>(fTable + (<usize>i << 3));
  const fNext = load<f64>(fTable + (<usize>(i + 1) << 3));
  if (fi + uniform() * (fNext - fi) < exp(-0.5 * z * z)) return reinterpret<f64>(reinterpret<u64>(z) ^ sign);
  return NaN;
}

// @ts-ignore: decorator
@inline function dOf(shape: f64): f64 {
  return (shape >= 1 ? shape : shape + 1) - 1.0 / 3.0;
}

// @ts-ignore: decorator
@inline function cOf(d: f64): f64 {
  return 1 / Math.sqrt(9 * d);
}

/**
 * n Gamma variates into `out`, cell m's shape a and its d = a' − 1/3 and c = 1/√(9d) (a' = a, or
 * a + 1 when a < 1) at `cells + m·stride` (`prepare`), a ≤ 0 giving 0; returns their sum. As gamma.ts:
 * Marsaglia & Tsang (2000) at a', boosted by exp(ln U / a) when a < 1 — the same operations on the
 * same uniforms. d and c are worked out once per cell and draw, not per variate.
 */
function gammaRow(cells: usize, stride: usize, n: i32, out: usize): f64 {
  // The stream in locals on the common path (V8 keeps a module's globals in memory: each uniform
  // loaded and stored all four words), written back to the globals around the rare out-of-line
  // steps (wedge, tail, a rejected wedge's fresh normal), which draw from the globals.
  let t0 = s0;
  let t1 = s1;
  let t2 = s2;
  let t3 = s3;
  let total: f64 = 0;
  for (let j = 0; j < n; j++) {
    const cell = cells + <usize>j * stride;
    const a = load<f64>(cell);
    let g: f64 = 0;
    if (a > 0) {
      const d = load<f64>(cell, 8);
      const c = load<f64>(cell, 16);
      let v: f64;
      while (true) {
        let x: f64;
        do {
          // next(), on the locals.
          const r = rotl<u64>(t1 * 5, 7) * 9;
          const q = t1 << 17;
          t2 ^= t0; t3 ^= t1; t1 ^= t2; t0 ^= t3; t2 ^= q; t3 = rotl<u64>(t3, 45);
          const m = r >> 11;
          x = strip(m);
          if (x != x) {
            s0 = t0; s1 = t1; s2 = t2; s3 = t3;
            x = wedgeOrTail(m);
            if (x != x) x = normal();
            t0 = s0; t1 = s1; t2 = s2; t3 = s3;
          }
          v = 1 + c * x;
        } while (v <= 0);
        v = v * v * v;
        const r = rotl<u64>(t1 * 5, 7) * 9;
        const q = t1 << 17;
        t2 ^= t0; t3 ^= t1; t1 ^= t2; t0 ^= t3; t2 ^= q; t3 = rotl<u64>(t3, 45);
        const u = <f64>(r >> 11) * 1.1102230246251565e-16;
        const x2 = x * x;
        if (u < 1 - 0.0331 * x2 * x2) break;
        if (log(u) < 0.5 * x2 + d * (1 - v + log(v))) break;
      }
      g = d * v;
      if (a < 1) {
        const r = rotl<u64>(t1 * 5, 7) * 9;
        const q = t1 << 17;
        t2 ^= t0; t3 ^= t1; t1 ^= t2; t0 ^= t3; t2 ^= q; t3 = rotl<u64>(t3, 45);
        g = g * exp(log(<f64>(r >> 11) * 1.1102230246251565e-16) / a);
      }
    }
    store<f64>(out + (<usize>j << 3), g);
    total += g;
  }
  s0 = t0;
  s1 = t1;
  s2 = t2;
  s3 = t3;
  return total;
}

/** Redraws of a row whose every variate underflowed (dirichlet.ts MAX_REDRAWS). */
const MAX_REDRAWS = 16;

/**
 * A drawn matrix's cells made ready for its year matrices: for row i with κᵢ < ∞ and each cell,
 * at `cells + 24·(i·k + j)`, the shape a = κᵢ·Pᵢⱼ (as year-matrix.ts: the Dirichlet's αⱼ) and its d and c.
 */
export function prepare(p: usize, kappa: usize, k: i32, cells: usize): void {
  for (let i = 0; i < k; i++) {
    const kap = load<f64>(kappa + (<usize>i << 3));
    if (kap == Infinity) continue;
    for (let j = 0; j < k; j++) {
      const at = i * k + j;
      const a = kap * load<f64>(p + (<usize>at << 3));
      const d = dOf(a);
      const cell = cells + <usize>at * 24;
      store<f64>(cell, a);
      store<f64>(cell, d, 8);
      store<f64>(cell, cOf(d), 16);
    }
  }
}

/**
 * One year's matrix around a drawn one, as year-matrix.ts describes: row i ~ Dirichlet(κᵢ·Pᵢ) into
 * `out` (k × k), rows with κᵢ = ∞ copied, zero cells left zero; from the stream whose 256-bit state
 * is at `state` (advanced in place), with the cells `prepare` made.
 */
export function yearMatrix(state: usize, p: usize, kappa: usize, cells: usize, k: i32, out: usize): void {
  s0 = load<u64>(state);
  s1 = load<u64>(state, 8);
  s2 = load<u64>(state, 16);
  s3 = load<u64>(state, 24);
  for (let i = 0; i < k; i++) {
    const kap = load<f64>(kappa + (<usize>i << 3));
    const to = out + (<usize>(i * k) << 3);
    if (kap == Infinity) {
      memory.copy(to, p + (<usize>(i * k) << 3), <usize>k << 3);
      continue;
    }
    dirichlet(cells + <usize>(i * k) * 24, k, to);
  }
  store<u64>(state, s0);
  store<u64>(state, s1, 8);
  store<u64>(state, s2, 16);
  store<u64>(state, s3, 24);
}

/** n Gamma(shape) variates into `out` from the stream at `state` (advanced in place): for tests and the bench. */
export function gammas(state: usize, shape: f64, n: i32, out: usize): void {
  s0 = load<u64>(state);
  s1 = load<u64>(state, 8);
  s2 = load<u64>(state, 16);
  s3 = load<u64>(state, 24);
  // One cell, read n times (stride 0), after the gammas' scratch.
  const cell = out + (<usize>n << 3);
  const d = dOf(shape);
  store<f64>(cell, shape);
  store<f64>(cell, d, 8);
  store<f64>(cell, cOf(d), 16);
  gammaRow(cell, 0, n, out);
  store<u64>(state, s0);
  store<u64>(state, s1, 8);
  store<u64>(state, s2, 16);
  store<u64>(state, s3, 24);
}

/** Dirichlet(α) by normalised gamma variates, redrawn when all underflow, as dirichlet.ts; α and its d, c are `prepare`'s cells. */
function dirichlet(cells: usize, n: i32, out: usize): void {
  for (let attempt = 0; attempt < MAX_REDRAWS; attempt++) {
    const total = gammaRow(cells, 24, n, out);
    if (total > 0 && isFinite(total)) {
      for (let j = 0; j < n; j++) {
        const at = out + (<usize>j << 3);
        store<f64>(at, load<f64>(at) / total);
      }
      return;
    }
  }
  let best = 0;
  for (let j = 1; j < n; j++) if (load<f64>(cells + <usize>j * 24) > load<f64>(cells + <usize>best * 24)) best = j;
  for (let j = 0; j < n; j++) store<f64>(out + (<usize>j << 3), j == best ? 1.0 : 0.0);
}

/**
 * The projection's arithmetic: n steps of x ← x·M for one drawn matrix M (k × k at `m`), the mix
 * x (k at `x`) updated in place and each step's mix stored at `out + s·k` (s = 0 … n − 1); `y` is
 * k of scratch. Exactly the operations of the JavaScript projector (project-chunk.ts), in the same
 * order — y = x₀·M₀, then y += xᵢ·Mᵢ for each later i with xᵢ ≠ 0 — two cells at a time in 128-bit
 * SIMD lanes (each lane one IEEE multiply and one add, no fused multiply-add), so the same bits.
 *
 * Why here: a typed-array loop in JavaScript runs these multiply-adds at about a fifth of the speed
 * of the same loop compiled to WebAssembly (DEVELOPERS.md, Benchmarks: 2·10⁸ multiply-adds).
 */
export function projectSteps(m: usize, k: i32, x: usize, y: usize, n: i32, out: usize): void {
  const pairs = k >> 1;
  const last = <usize>(k - 1) << 3;
  const odd = (k & 1) == 1;
  for (let s = 0; s < n; s++) {
    const first = load<f64>(x);
    const x0 = f64x2.splat(first);
    for (let j = 0; j < pairs; j++) v128.store(y + (<usize>j << 4), f64x2.mul(x0, v128.load(m + (<usize>j << 4))));
    if (odd) store<f64>(y + last, first * load<f64>(m + last));
    for (let i = 1; i < k; i++) {
      const xs = load<f64>(x + (<usize>i << 3));
      if (xs == 0) continue;
      const xi = f64x2.splat(xs);
      const row = m + (<usize>(i * k) << 3);
      for (let j = 0; j < pairs; j++) {
        const at = y + (<usize>j << 4);
        v128.store(at, f64x2.add(v128.load(at), f64x2.mul(xi, v128.load(row + (<usize>j << 4)))));
      }
      if (odd) store<f64>(y + last, load<f64>(y + last) + xs * load<f64>(row + last));
    }
    memory.copy(x, y, <usize>k << 3);
    memory.copy(out + (<usize>(s * k) << 3), y, <usize>k << 3);
  }
}

/**
 * One step of a run with treatments, zones, parcels or landscape events (project-chunk.ts, the
 * general projector), for its G sub-populations: sub-population g's mix (k at `x + g·k`) becomes
 * y = x_g·M_g with M_g the matrix whose byte address is the u32 at `mats + 4g`, then for each
 * landscape event e with the byte at `flags + e·G + g` set, y ← y·E_e (E_e at `eventMats + e·k²`):
 * z = 0, z += yᵢ·E_e,i for each i with yᵢ ≠ 0. The landscape's mix `total` (k) is the sum over
 * sub-populations, assigned for the first and added for the rest. Exactly the JavaScript
 * projector's operations in its order (the multiply-adds two lanes at a time, as projectSteps),
 * so the same bits.
 */
export function planStep(G: i32, k: i32, x: usize, y: usize, z: usize, mats: usize, events: i32, eventMats: usize,
  flags: usize, total: usize): void {
  const pairs = k >> 1;
  const last = <usize>(k - 1) << 3;
  const odd = (k & 1) == 1;
  const rowBytes = <usize>k << 3;
  for (let g = 0; g < G; g++) {
    const m = <usize>load<u32>(mats + (<usize>g << 2));
    const xg = x + <usize>(g * k) * 8;
    const first = load<f64>(xg);
    const x0 = f64x2.splat(first);
    for (let j = 0; j < pairs; j++) v128.store(y + (<usize>j << 4), f64x2.mul(x0, v128.load(m + (<usize>j << 4))));
    if (odd) store<f64>(y + last, first * load<f64>(m + last));
    for (let i = 1; i < k; i++) {
      const xs = load<f64>(xg + (<usize>i << 3));
      if (xs == 0) continue;
      const xi = f64x2.splat(xs);
      const row = m + <usize>i * rowBytes;
      for (let j = 0; j < pairs; j++) {
        const at = y + (<usize>j << 4);
        v128.store(at, f64x2.add(v128.load(at), f64x2.mul(xi, v128.load(row + (<usize>j << 4)))));
      }
      if (odd) store<f64>(y + last, load<f64>(y + last) + xs * load<f64>(row + last));
    }
    for (let e = 0; e < events; e++) {
      if (load<u8>(flags + <usize>(e * G + g)) == 0) continue;
      const E = eventMats + <usize>(e * k * k) * 8;
      memory.fill(z, 0, rowBytes);
      for (let i = 0; i < k; i++) {
        const yi = load<f64>(y + (<usize>i << 3));
        if (yi == 0) continue;
        const row = E + <usize>i * rowBytes;
        for (let j = 0; j < k; j++) {
          const at = z + (<usize>j << 3);
          store<f64>(at, load<f64>(at) + yi * load<f64>(row + (<usize>j << 3)));
        }
      }
      memory.copy(y, z, rowBytes);
    }
    memory.copy(xg, y, rowBytes);
    if (g == 0) memory.copy(total, y, rowBytes);
    else {
      for (let s = 0; s < k; s++) {
        const at = total + (<usize>s << 3);
        store<f64>(at, load<f64>(at) + load<f64>(y + (<usize>s << 3)));
      }
    }
  }
}

/** A share within this of the largest counts as "most common" too (project-chunk.ts MOST_COMMON_TOLERANCE). */
const MOST_COMMON_TOLERANCE: f64 = 1e-12;

/**
 * The general projector's tracking at step t of one draw, on the landscape mix `total` (k), as its
 * JavaScript did it (project-chunk.ts), the same comparisons in the same order: while `state[0]`
 * (i32: states not yet the most common) is above 0, each state whose first step as the most common
 * (`first`, k i32, −1: not yet) is unset and whose share is within MOST_COMMON_TOLERANCE of the
 * largest takes step t; with a target (`hasTarget`), the sum of the members' shares (`members`,
 * `count` i32) met or not within [low, high] moves the run's start `state[1]` and, after `staysMet`
 * steps, the first step at the target `state[2]`.
 */
export function trackStep(t: i32, k: i32, total: usize, first: usize, state: usize, hasTarget: i32, members: usize, count: i32,
  low: f64, high: f64, staysMet: i32): void {
  let pending = load<i32>(state);
  if (pending > 0) {
    let largest: f64 = 0;
    for (let s = 0; s < k; s++) {
      const v = load<f64>(total + (<usize>s << 3));
      if (v > largest) largest = v;
    }
    for (let s = 0; s < k; s++) {
      const at = first + (<usize>s << 2);
      if (load<i32>(at) == -1 && load<f64>(total + (<usize>s << 3)) >= largest - MOST_COMMON_TOLERANCE) {
        store<i32>(at, t);
        pending -= 1;
      }
    }
    store<i32>(state, pending);
  }
  if (hasTarget != 0) {
    let sum: f64 = 0;
    for (let n = 0; n < count; n++) sum += load<f64>(total + (<usize>load<i32>(members + (<usize>n << 2)) << 3));
    let run = load<i32>(state, 4);
    if (!(sum >= low && sum <= high)) run = -1;
    else {
      if (run < 0) run = t;
      if (load<i32>(state, 8) == -1 && t - run + 1 >= staysMet) store<i32>(state, run, 8);
    }
    store<i32>(state, run, 4);
  }
}
