import { i32At, setI32, f64At, setF64, addF64 } from './memory-access';
/**
 * The E-step of EM with observer error in WebAssembly (AssemblyScript, compiled by `npm run build`
 * through scripts/build-wasm.mjs into src/chain/em-kernel-wasm.ts): for every record pattern, the
 * scaled forward–backward over its support (Rabiner 1989, eqs. 91–93 and 37) and its expected
 * counts — transitions, true→recorded, first true states — added into the totals, and the
 * log-likelihood.
 *
 * Why: profiled with `node --cpu-prof` on the `observer` bench (10,000 sites × 12 surveys × 8
 * states, 43 E-steps), the JavaScript E-step (src/chain/error-e-step.ts) was nearly all of EM's CPU:
 * short loops over a record's support whose bounds checks and typed-array loads cost more than the
 * arithmetic (DEVELOPERS.md, Benchmarks, for the figures).
 *
 * The numbers are those of error-e-step.ts, bit for bit (test/chain/em-kernel.test.ts; the EM digest
 * of test/chain/error-em-support.test.ts): every sum over the same terms in the same order from +0,
 * every product associated as there (left to right), +, −, ×, ÷ correctly rounded IEEE 754 operations
 * in both, nothing fused or reordered, and log imported from the host's Math, so no libm of our own
 * can round differently.
 *
 * Memory is laid out by the host (src/chain/em-kernel.ts); this module only computes.
 */

@external("env", "log") declare function log(x: f64): f64;

let K: i32 = 0;
let patternCount: i32 = 0;
/** Byte offsets of the host's arrays (f64 unless said): see the host for each. */
let sitesAt: usize = 0;
let startAt: usize = 0; // i32
let atAt: usize = 0; // i32
let columnAt: usize = 0; // i32: matrix · k² + recorded state, per survey
let piAt: usize = 0;
let pAt: usize = 0;
let eAt: usize = 0;
let transitionsAt: usize = 0;
let recordsAt: usize = 0;
let firstAt: usize = 0;
let emAt: usize = 0;
let alphaAt: usize = 0;
let betaAt: usize = 0;
let scaleAt: usize = 0;
let supportAt: usize = 0; // i32
let supportCountAt: usize = 0; // i32

/** Bytes for the host's arrays (never freed: the host keeps one area per thread and grows it by doubling). */
export function reserve(bytes: usize): usize {
  return heap.alloc(bytes);
}

export function setPatterns(states: i32, count: i32, sites: usize, start: usize, at: usize, column: usize): void {
  K = states;
  patternCount = count;
  sitesAt = sites;
  startAt = start;
  atAt = at;
  columnAt = column;
}

export function setParameters(pi: usize, p: usize, e: usize): void {
  piAt = pi;
  pAt = p;
  eAt = e;
}

export function setOutputs(transitions: usize, records: usize, first: usize): void {
  transitionsAt = transitions;
  recordsAt = records;
  firstAt = first;
}

export function setWork(em: usize, alpha: usize, beta: usize, scale: usize, support: usize, supportCount: usize): void {
  emAt = em;
  alphaAt = alpha;
  betaAt = beta;
  scaleAt = scale;
  supportAt = support;
  supportCountAt = supportCount;
}

/**
 * Every pattern's share of the E-step, in pattern order, added into the outputs (the host zeroes
 * them, or starts the true→recorded counts at the assessment's); `logLikelihood` is the sum so far
 * (the assessment's terms), returned with every pattern's terms added in order.
 */
export function eStep(logLikelihood: f64): f64 {
  // The globals in locals: V8 keeps a module's mutable globals in memory (year-kernel.ts).
  const k = K, sites = sitesAt, start = startAt, atOf = atAt, column = columnAt, pi = piAt, p = pAt, e = eAt;
  const transitions = transitionsAt, records = recordsAt, first = firstAt;
  const em = emAt, alpha = alphaAt, beta = betaAt, scale = scaleAt, support = supportAt, supportCount = supportCountAt;
  let total = logLikelihood;
  for (let q = 0; q < patternCount; q++) {
    const from = i32At(start, q);
    const to = i32At(start, q + 1);
    const T = i32At(atOf, to - 1) + 1;
    const n = f64At(sites, q);
    // The emission likelihoods (record-patterns.ts patternEmissions): ones, then E_m[x, r] at each survey.
    for (let i = 0; i < T * k; i++) setF64(em, i, 1);
    for (let v = from; v < to; v++) {
      const row = i32At(atOf, v) * k;
      const cell = i32At(column, v);
      for (let x = 0; x < k; x++) setF64(em, row + x, f64At(e, cell + x * k));
    }
    // support[t·k …]: the states s with em[t·k + s] > 0, increasing; supportCount[t] of them.
    for (let t = 0; t < T; t++) {
      let m = 0;
      const row = t * k;
      for (let s = 0; s < k; s++) if (f64At(em, row + s) > 0) setI32(support, row + m++, s);
      setI32(supportCount, t, m);
    }
    // Forward, scaled.
    for (let t = 0; t < T; t++) {
      let c = 0.0;
      const row = t * k;
      for (let s = 0; s < k; s++) setF64(alpha, row + s, 0);
      const m = i32At(supportCount, t);
      const before = (t - 1) * k;
      const m0 = t == 0 ? 0 : i32At(supportCount, t - 1);
      for (let i = 0; i < m; i++) {
        const s = i32At(support, row + i);
        let x: f64;
        if (t == 0) x = f64At(pi, s);
        else {
          x = 0;
          for (let j = 0; j < m0; j++) {
            const r = i32At(support, before + j);
            x += f64At(alpha, before + r) * f64At(p, r * k + s);
          }
        }
        x *= f64At(em, row + s);
        setF64(alpha, row + s, x);
        c += x;
      }
      for (let i = 0; i < m; i++) {
        const s = i32At(support, row + i);
        setF64(alpha, row + s, f64At(alpha, row + s) / c);
      }
      setF64(scale, t, c);
      total += n * log(c);
    }
    // Backward, scaled by the forward's constants.
    const lastRow = (T - 1) * k;
    for (let i = 0; i < i32At(supportCount, T - 1); i++) setF64(beta, lastRow + i32At(support, lastRow + i), 1);
    for (let t = T - 2; t >= 0; t--) {
      const next = (t + 1) * k;
      const m1 = i32At(supportCount, t + 1);
      const m = i32At(supportCount, t);
      const c = f64At(scale, t + 1);
      for (let i = 0; i < m; i++) {
        const r = i32At(support, t * k + i);
        let x = 0.0;
        for (let j = 0; j < m1; j++) {
          const s = i32At(support, next + j);
          x += f64At(p, r * k + s) * f64At(em, next + s) * f64At(beta, next + s);
        }
        setF64(beta, t * k + r, x / c);
      }
    }
    // Expected first true states, true→recorded counts and transitions.
    for (let i = 0; i < i32At(supportCount, 0); i++) {
      const s = i32At(support, i);
      addF64(first, s, n * f64At(alpha, s) * f64At(beta, s));
    }
    for (let v = from; v < to; v++) {
      const t = i32At(atOf, v);
      const cell = i32At(column, v);
      const row = t * k;
      const m = i32At(supportCount, t);
      for (let i = 0; i < m; i++) {
        const x = i32At(support, row + i);
        addF64(records, cell + x * k, n * f64At(alpha, row + x) * f64At(beta, row + x));
      }
    }
    for (let t = 0; t + 1 < T; t++) {
      const inv = n / f64At(scale, t + 1);
      const row = t * k;
      const next = (t + 1) * k;
      const m1 = i32At(supportCount, t + 1);
      const m = i32At(supportCount, t);
      for (let i = 0; i < m; i++) {
        const a = i32At(support, row + i);
        const fromA = f64At(alpha, row + a);
        if (fromA == 0) continue;
        const pRow = a * k;
        for (let j = 0; j < m1; j++) {
          const b = i32At(support, next + j);
          addF64(transitions, pRow + b, fromA * f64At(p, pRow + b) * f64At(em, next + b) * f64At(beta, next + b) * inv);
        }
      }
    }
  }
  return total;
}
