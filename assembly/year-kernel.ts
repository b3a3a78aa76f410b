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
 * order. The boost's exp and log are AssemblyScript's NativeMath — the table-driven methods of musl's
 * libm (from ARM's optimized routines) — not the host's: the two calls out to V8's Math.exp and
 * Math.log were about half of a small shape's variate (60 → 35 ns), and year matrices of small
 * transition chances are mostly small shapes. They can round a last bit differently from V8's, so
 * the JavaScript reference of these variates takes this module's `nativeExp` and `nativeLog` for
 * the boost (test/uncertainty/year-kernel.test.ts). Everything else keeps the host's exp and log:
 * the acceptance test the squeeze leaves (NativeMath's log there, inlined into the gamma loop,
 * slowed dense rows 15 → 24 ns a variate), the normal's rare wedge and tail, and the multinomials
 * below. sqrt, +, −, ×, ÷ are correctly rounded IEEE 754 operations in both.
 *
 * Where the time goes, and what was done about it (2026-12-03; DEVELOPERS.md, Benchmarks, for the
 * figures): a draw's cells are made ready once (`prepare`: the shape and Marsaglia–Tsang's d and c),
 * the gamma loop of a row is one function with the stream in locals and the ziggurat's common path
 * inline, the strip taken from the uniform's integer bits. What is left, by perf: on dense rows of
 * shapes near 5, the uniform → strip → acceptance chain itself, and the log for the ~5% of
 * variates the squeeze does not accept; on small shapes, the boost's exp and log — once the host's,
 * about half of such a variate's time, now NativeMath's (above).
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

/** The boost's exp, for the JavaScript reference of the gamma variates (tests). */
export function nativeExp(x: f64): f64 {
  return NativeMath.exp(x);
}

/** The boost's log, for the JavaScript reference of the gamma variates (tests). */
export function nativeLog(x: f64): f64 {
  return NativeMath.log(x);
}

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
 * same uniforms, the boost's exp and log NativeMath's (see the top). d and c are worked out once
 * per cell and draw, not per variate.
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
        g = g * NativeMath.exp(NativeMath.log(<f64>(r >> 11) * 1.1102230246251565e-16) / a);
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

/**
 * yearMatrix for streams n = first … count − 1 (at `states + 32n`) and, within each, slots
 * z = 0 … slots − 1 (drawn matrix, κ and cells as the host lays them out, a slot after another),
 * in that order, into `out + 8·(n·slots + z)·k²`: one call for a draw's years where the host made
 * one per year and slot (the zoned demo: 90 a draw) and copied each year out.
 */
export function yearMatrices(states: usize, p: usize, kappa: usize, cells: usize, k: i32, slots: i32, first: i32, count: i32, out: usize): void {
  const k2 = <usize>(k * k);
  for (let n = first; n < count; n++) {
    for (let z = 0; z < slots; z++) {
      yearMatrix(states + (<usize>n << 5), p + <usize>z * k2 * 8, kappa + <usize>(z * k) * 8, cells + <usize>z * 3 * k2 * 8, k,
        out + (<usize>(n * slots + z) * k2 << 3));
    }
  }
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
  for (let s = 0; s < n; s++) {
    step(m, k, x, y);
    memory.copy(out + (<usize>(s * k) << 3), y, <usize>k << 3);
  }
}

// ————— Plot counts: Multinomial(n, row) by sequential binomials, as src/uncertainty/multinomial.ts —————
//
// Why here: the plot step draws some 3.6 M binomials a forecast of 5,000 plots (4,000 draws × 30
// years); in JavaScript the 32-bit-halves xoshiro refill, BTPE and inversion were about half its CPU
// (DEVELOPERS.md, Benchmarks). The numbers are those of binomial.ts and multinomial.ts bit for bit
// (test/uncertainty/plot-kernel.test.ts): the same uniforms of the same stream, every operation in
// the same order in doubles, exp, log and log1p the host's; floor, sqrt, abs, min are exact in both.

@external("env", "log1p") declare function log1p(x: f64): f64;

/** binomial.ts BTPE_FROM: BTPE from n·min(p, 1 − p) = 10, inversion below. */
const BTPE_FROM: f64 = 10;

/** Binomial(n, p) as binomial.ts `binomialSampler`, from the stream in the globals. */
function binomial(n: f64, p: f64): f64 {
  if (n <= 0 || p <= 0) return 0;
  if (p >= 1) return n;
  if (n == 1) return uniform() < p ? 1 : 0;
  const flip = p > 0.5;
  const r = flip ? 1 - p : p;
  const x = n * r < BTPE_FROM ? inversion(n, r) : btpe(n, r);
  return flip ? n - x : x;
}

/** binomial.ts `inversion`: sequential search through the pmf from f(0) = qⁿ, for p ≤ ½, n·p < 10. */
function inversion(n: f64, p: f64): f64 {
  const q = 1 - p;
  const ratio = p / q;
  const first = exp(n * log1p(-p));
  while (true) {
    let u = uniform();
    let f = first;
    let x: f64 = 0;
    while (u >= f) {
      u -= f;
      x += 1;
      if (x > n) break;
      f *= ((n - x + 1) / x) * ratio;
    }
    if (x <= n) return x;
  }
  return 0;
}

/** binomial.ts `stirlingTail`. */
function stirlingTail(x: f64): f64 {
  const x2 = x * x;
  return (13860.0 - (462.0 - (132.0 - (99.0 - 140.0 / x2) / x2) / x2) / x2) / x / 166320.0;
}

/** binomial.ts `logRatioToMode`: ln(f(y)/f(M)) by Stirling's formula (BTPE step 5.3, with its sign fix). */
function logRatioToMode(n: f64, p: f64, m: f64, y: f64): f64 {
  const q = 1 - p;
  const xm = m + 0.5;
  const x1 = y + 1;
  const f1 = m + 1;
  const z = n + 1 - m;
  const w = n - y + 1;
  return xm * log(f1 / x1) + (n - m + 0.5) * log(z / w) + (y - m) * log((w * p) / (x1 * q)) +
    stirlingTail(f1) + stirlingTail(z) - stirlingTail(x1) - stirlingTail(w);
}

/** binomial.ts `btpe`: Kachitvichyanukul & Schmeiser (1988), steps 0–5.3, for p ≤ ½, n·p ≥ 10. */
function btpe(n: f64, p: f64): f64 {
  const q = 1 - p;
  const fm = n * p + p;
  const m = Math.floor(fm);
  const npq = n * p * q;
  const p1 = Math.floor(2.195 * Math.sqrt(npq) - 4.6 * q) + 0.5;
  const xm = m + 0.5;
  const xl = xm - p1;
  const xr = xm + p1;
  const c = 0.134 + 20.5 / (15.3 + m);
  let a = (fm - xl) / (fm - xl * p);
  const lambdaL = a * (1 + a / 2);
  a = (xr - fm) / (xr * q);
  const lambdaR = a * (1 + a / 2);
  const p2 = p1 * (1 + 2 * c);
  const p3 = p2 + c / lambdaL;
  const p4 = p3 + c / lambdaR;
  while (true) {
    const u = uniform() * p4;
    let v = uniform();
    if (u <= p1) return Math.floor(xm - p1 * v + u);
    let y: f64;
    if (u <= p2) {
      const x = xl + (u - p1) / c;
      v = v * c + 1 - Math.abs(m - x + 0.5) / p1;
      if (v > 1) continue;
      y = Math.floor(x);
    } else if (u <= p3) {
      y = Math.floor(xl + log(v) / lambdaL);
      if (y < 0) continue;
      v *= (u - p2) * lambdaL;
    } else {
      y = Math.floor(xr - log(v) / lambdaR);
      if (y > n) continue;
      v *= (u - p3) * lambdaR;
    }
    const k = Math.abs(y - m);
    if (k <= 20 || k >= npq / 2 - 1) {
      const s = p / q;
      const as = s * (n + 1);
      let f: f64 = 1;
      if (m < y) for (let i = m + 1; i <= y; i++) f *= as / i - s;
      else if (m > y) for (let i = y + 1; i <= m; i++) f /= as / i - s;
      if (v <= f) return y;
      continue;
    }
    const rho = (k / npq) * ((k * (k / 3 + 0.625) + 1.0 / 6.0) / npq + 0.5);
    const t = -k * k / (2 * npq);
    const logV = log(v);
    if (logV < t - rho) return y;
    if (logV > t + rho) continue;
    if (logV <= logRatioToMode(n, p, m, y)) return y;
  }
  return 0;
}

/** multinomial.ts: Multinomial(n, p[0 … k)) by sequential binomials, *added* to the i32 counts at `out`. */
function multinomial(n: f64, p: usize, k: i32, out: usize): void {
  let left = n;
  let mass: f64 = 1;
  for (let j = 0; j < k && left > 0; j++) {
    const pj = load<f64>(p + (<usize>j << 3));
    const x: f64 = j == k - 1 || pj >= mass ? left : pj <= 0 ? 0 : binomial(left, Math.min(1, pj / mass));
    const at = out + (<usize>j << 2);
    store<i32>(at, load<i32>(at) + <i32>x);
    left -= x;
    mass -= pj;
  }
}

/** One Multinomial(n, p[0 … k)) added to the counts at `out`, from the stream whose state is at `state` (advanced in place). */
export function multinomialInto(state: usize, n: i32, p: usize, k: i32, out: usize): void {
  s0 = load<u64>(state);
  s1 = load<u64>(state, 8);
  s2 = load<u64>(state, 16);
  s3 = load<u64>(state, 24);
  multinomial(<f64>n, p, k, out);
  store<u64>(state, s0);
  store<u64>(state, s1, 8);
  store<u64>(state, s2, 16);
  store<u64>(state, s3, 24);
}

/**
 * One step of plots in k states (plot-counts.ts): the counts at `from` (k i32) each move on as
 * Multinomial(nᵢ, row i of the k × k matrix at `m`), added to the counts at `to`, rows in order and
 * empty rows skipped; from the stream at `state` (advanced in place).
 */
export function moveRows(state: usize, m: usize, k: i32, from: usize, to: usize): void {
  s0 = load<u64>(state);
  s1 = load<u64>(state, 8);
  s2 = load<u64>(state, 16);
  s3 = load<u64>(state, 24);
  for (let i = 0; i < k; i++) {
    const n = load<i32>(from + (<usize>i << 2));
    if (n > 0) multinomial(<f64>n, m + (<usize>(i * k) << 3), k, to);
  }
  store<u64>(state, s0);
  store<u64>(state, s1, 8);
  store<u64>(state, s2, 16);
  store<u64>(state, s3, 24);
}
/**
 * y = x·M, two lanes at a time, skipping a zero share: the multiply-adds of projectSteps, planStep
 * and projectTracked, one owner (the JavaScript projector's operations in its order, so its bits).
 */
// @ts-ignore: decorator
@inline function multiply(m: usize, k: i32, x: usize, y: usize): void {
  const pairs = k >> 1;
  const last = <usize>(k - 1) << 3;
  const odd = (k & 1) == 1;
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
}

/** One step x ← x·M of projectSteps (y: k of scratch, left holding the new mix too). */
// @ts-ignore: decorator
@inline function step(m: usize, k: i32, x: usize, y: usize): void {
  multiply(m, k, x, y);
  memory.copy(x, y, <usize>k << 3);
}

/**
 * The plain projection of `nd` draws (no treatment, event or zone: each step the draw's matrix,
 * or with year-to-year variation that step's year matrix) through steps from … to − 1, with the tracking the JavaScript
 * projector does at each step (project-chunk.ts; the same comparisons and sums in the same order,
 * so the same numbers): draw d's matrix for step t at `p + d·drawStride + (t − from)·stepStride`
 * (doubles: its one drawn matrix with drawStride k², stepStride 0; its year matrices with
 * drawStride (to − from)·k², stepStride k²), its mix at `xs + d·k` (already the start
 * when from = 0; step 0 is not projected), the first step each state is the most common at
 * `firstMostCommon + d·k` (i32, −1: not yet), the start of the current run of steps meeting the
 * target and the first step it was reached at `runStart + d`, `firstAtTarget + d` (i32). A step t
 * with `slotOf[t − from] = r ≥ 0` stores the mix at `block + (r·k + s)·nd + d`. The target is met
 * when the sum of the shares of the `nMembers` states at `members` (i32) lies in [metLow, metHigh].
 *
 * Why: a small forecast runs this loop only a few thousand times, and in JavaScript most of them ran
 * before V8 had optimised it (unoptimised code, boxed doubles for the collector), several times over
 * after deoptimisations; WebAssembly is compiled before its first call (DEVELOPERS.md, Benchmarks).
 */
export function projectTracked(p: usize, drawStride: i32, stepStride: i32, xs: usize, firstMostCommon: usize, runStart: usize, firstAtTarget: usize,
  nd: i32, k: i32, from: i32, to: i32, slotOf: usize, block: usize,
  members: usize, nMembers: i32, hasTarget: i32, metLow: f64, metHigh: f64, staysMet: i32, y: usize): void {
  const firstStep = max(from, 1);
  for (let d = 0; d < nd; d++) {
    const m = p + (<usize>(d * drawStride) << 3);
    const x = xs + (<usize>(d * k) << 3);
    const fmc = firstMostCommon + (<usize>(d * k) << 2);
    let pending = 0;
    for (let s = 0; s < k; s++) if (load<i32>(fmc + (<usize>s << 2)) == -1) pending += 1;
    let run = load<i32>(runStart + (<usize>d << 2));
    let reached = load<i32>(firstAtTarget + (<usize>d << 2));
    for (let t = from; t < to; t++) {
      if (t >= firstStep) step(m + (<usize>((t - from) * stepStride) << 3), k, x, y);
      const slot = load<i32>(slotOf + (<usize>(t - from) << 2));
      if (slot >= 0) {
        for (let s = 0; s < k; s++) store<f64>(block + (<usize>((slot * k + s) * nd + d) << 3), load<f64>(x + (<usize>s << 3)));
      }
      if (pending > 0) pending = mostCommonAt(t, k, x, fmc, pending);
      if (hasTarget) {
        run = targetRunAt(t, x, members, nMembers, metLow, metHigh, run);
        if (run >= 0 && reached == -1 && t - run + 1 >= staysMet) reached = run;
      }
    }
    store<i32>(runStart + (<usize>d << 2), run);
    store<i32>(firstAtTarget + (<usize>d << 2), reached);
  }
}

/** project-chunk.ts MOST_COMMON_TOLERANCE: a share within this of the largest counts as most common too. */
const MOST_COMMON_TOLERANCE: f64 = 1e-12;
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
  const rowBytes = <usize>k << 3;
  for (let g = 0; g < G; g++) {
    const m = <usize>load<u32>(mats + (<usize>g << 2));
    const xg = x + <usize>(g * k) * 8;
    multiply(m, k, xg, y);
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

/**
 * Steps t = first … to − 1 of one draw of the general projector (project-chunk.ts runProjector),
 * each as it made them one call at a time: planStep on step t's matrices (G u32 byte addresses at
 * `mats + 4·(t − from)·G`) and event flags (events·G bytes at `flags + (t − from)·events·G`); the
 * landscape mix `total` stored at `block + 8·((slot·k + s)·blockDraws + b)` when the i32
 * `slotOf[t − from]` is a slot ≥ 0; then trackStep. One call a draw where there were two a step.
 */
export function planSteps(first: i32, from: i32, to: i32, G: i32, k: i32, x: usize, y: usize, z: usize, mats: usize, events: i32,
  eventMats: usize, flags: usize, total: usize, slotOf: usize, block: usize, blockDraws: i32, b: i32,
  tracked: usize, state: usize, hasTarget: i32, members: usize, count: i32, low: f64, high: f64, staysMet: i32): void {
  for (let t = first; t < to; t++) {
    const n = t - from;
    planStep(G, k, x, y, z, mats + (<usize>(n * G) << 2), events, eventMats, flags + <usize>(n * events * G), total);
    const slot = load<i32>(slotOf + (<usize>n << 2));
    if (slot >= 0) {
      for (let s = 0; s < k; s++) store<f64>(block + (<usize>((slot * k + s) * blockDraws + b) << 3), load<f64>(total + (<usize>s << 3)));
    }
    trackStep(t, k, total, tracked, state, hasTarget, members, count, low, high, staysMet);
  }
}

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
  const pending = load<i32>(state);
  if (pending > 0) store<i32>(state, mostCommonAt(t, k, total, first, pending));
  if (hasTarget != 0) {
    const run = targetRunAt(t, total, members, count, low, high, load<i32>(state, 4));
    if (run >= 0 && load<i32>(state, 8) == -1 && t - run + 1 >= staysMet) store<i32>(state, run, 8);
    store<i32>(state, run, 4);
  }
}

/**
 * The first times' rule, one owner for projectTracked and trackStep (project-chunk.ts's, in its
 * order): each state whose first step as the most common (`first`, k i32, −1: not yet) is unset and
 * whose share of `mix` is within MOST_COMMON_TOLERANCE of the largest takes step t. Returns the
 * states still pending.
 */
// @ts-ignore: decorator
@inline function mostCommonAt(t: i32, k: i32, mix: usize, first: usize, pending: i32): i32 {
  let largest: f64 = 0;
  for (let s = 0; s < k; s++) {
    const v = load<f64>(mix + (<usize>s << 3));
    if (v > largest) largest = v;
  }
  for (let s = 0; s < k; s++) {
    const at = first + (<usize>s << 2);
    if (load<i32>(at) == -1 && load<f64>(mix + (<usize>s << 3)) >= largest - MOST_COMMON_TOLERANCE) {
      store<i32>(at, t);
      pending -= 1;
    }
  }
  return pending;
}

/**
 * The target's run at step t: −1 when the members' summed share of `mix` (`count` i32 at `members`)
 * lies outside [low, high], else the run's first step (t when it starts here).
 */
// @ts-ignore: decorator
@inline function targetRunAt(t: i32, mix: usize, members: usize, count: i32, low: f64, high: f64, run: i32): i32 {
  let sum: f64 = 0;
  for (let n = 0; n < count; n++) sum += load<f64>(mix + (<usize>load<i32>(members + (<usize>n << 2)) << 3));
  if (!(sum >= low && sum <= high)) return -1;
  return run < 0 ? t : run;
}

/**
 * The stationary mix of the k × k matrix at `p` whose one closed class is the m states at `members`
 * (i32), as chain/stationary.ts (stationaryGivenClasses, then gth: Grassmann, Taksar & Heyman 1985)
 * works it out, the same operations in the same order, so the same bits: the class's m × m block
 * into `a`, its states censored from the last to the first, and the mix written to `mix` (k, zero
 * off the class). `rowScale` and `pi`: m doubles of scratch each. Returns 0, or 1 + the state whose
 * pivot was not positive (the block is not irreducible: the caller says so).
 */
export function stationaryMix(p: usize, k: i32, members: usize, m: i32, a: usize, rowScale: usize, pi: usize, mix: usize): i32 {
  for (let r = 0; r < m; r++) {
    const i = load<i32>(members + (<usize>r << 2));
    for (let c = 0; c < m; c++) {
      const j = load<i32>(members + (<usize>c << 2));
      store<f64>(a + (<usize>(r * m + c) << 3), load<f64>(p + (<usize>(i * k + j) << 3)));
    }
    store<f64>(rowScale + (<usize>r << 3), 1);
  }
  for (let n = m - 1; n > 0; n--) {
    let s: f64 = 0;
    for (let j = 0; j < n; j++) s += load<f64>(a + (<usize>(n * m + j) << 3));
    if (!(s > 0)) return n + 1;
    let largest: f64 = 0;
    for (let i = 0; i < n; i++) largest = max(largest, load<f64>(a + (<usize>(i * m + n) << 3)));
    if (isFinite<f64>(largest / s)) {
      for (let i = 0; i < n; i++) {
        const at = a + (<usize>(i * m + n) << 3);
        store<f64>(at, load<f64>(at) / s);
      }
    } else {
      for (let j = 0; j < n; j++) {
        const at = a + (<usize>(n * m + j) << 3);
        store<f64>(at, load<f64>(at) / s);
      }
      store<f64>(rowScale + (<usize>n << 3), s);
    }
    for (let i = 0; i < n; i++) {
      const ain = load<f64>(a + (<usize>(i * m + n) << 3));
      if (ain == 0) continue;
      for (let j = 0; j < n; j++) {
        const at = a + (<usize>(i * m + j) << 3);
        store<f64>(at, load<f64>(at) + ain * load<f64>(a + (<usize>(n * m + j) << 3)));
      }
    }
  }
  store<f64>(pi, 1);
  for (let j = 1; j < m; j++) {
    let x: f64 = 0;
    for (let i = 0; i < j; i++) x += load<f64>(pi + (<usize>i << 3)) * load<f64>(a + (<usize>(i * m + j) << 3));
    const scale = load<f64>(rowScale + (<usize>j << 3));
    const share = x / scale;
    if (isFinite<f64>(share)) store<f64>(pi + (<usize>j << 3), share);
    else {
      const f = scale / x;
      for (let i = 0; i < j; i++) {
        const at = pi + (<usize>i << 3);
        store<f64>(at, load<f64>(at) * f);
      }
      store<f64>(pi + (<usize>j << 3), 1);
    }
  }
  let total: f64 = 0;
  for (let j = 0; j < m; j++) total += load<f64>(pi + (<usize>j << 3));
  memory.fill(mix, 0, <usize>k << 3);
  for (let r = 0; r < m; r++) {
    store<f64>(mix + (<usize>load<i32>(members + (<usize>r << 2)) << 3), load<f64>(pi + (<usize>r << 3)) / total);
  }
  return 0;
}
