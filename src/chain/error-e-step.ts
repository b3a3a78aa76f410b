import { patternEmissions, patternLength, type RecordPatterns } from './record-patterns.js';

/** An E-step's expected completed counts and the log-likelihood at (π, P, E). */
export interface ErrorEStep {
  /** k × k expected one-step transitions of the true chain. */
  readonly transitions: Float64Array;
  /** M × k × k expected true→recorded counts (row = true state), the assessment's counts included. */
  readonly records: Float64Array;
  /** Expected true states at sites' first surveys. */
  readonly first: Float64Array;
  readonly logLikelihood: number;
}

/**
 * Expected completed counts at (π, P, E): transitions, true→recorded (assessment included) and first
 * true states — in JavaScript, the reference the WebAssembly E-step (em-kernel.ts, which error-em.ts
 * runs) is tested against bit for bit (test/chain/em-kernel.test.ts).
 */
export function errorEStep(records: RecordPatterns, assessment: Float64Array, pi: Float64Array, p: Float64Array, e: Float64Array, k: number): ErrorEStep {
  const out = { transitions: new Float64Array(k * k), records: Float64Array.from(assessment), first: new Float64Array(k), logLikelihood: 0 };
  for (let c = 0; c < assessment.length; c++) if (assessment[c]! > 0) out.logLikelihood += assessment[c]! * Math.log(e[c]!);
  let longest = 0;
  for (let q = 0; q < records.count; q++) longest = Math.max(longest, patternLength(records, q));
  const work = { emissions: new Float64Array(longest * k), alpha: new Float64Array(longest * k), beta: new Float64Array(longest * k), scale: new Float64Array(longest),
    support: new Int32Array(longest * k), supportCount: new Int32Array(longest) };
  for (let q = 0; q < records.count; q++) addPattern(records, q, pi, p, e, k, work, out);
  return out;
}

/**
 * One pattern's share of the E-step: the scaled forward–backward of forward-backward.ts (Rabiner
 * 1989, eqs. 91–93 and 37), written again here into buffers made once per E-step and adding
 * straight into the totals — forwardBackward allocates its marginals per call, which took most of
 * an EM iteration over 3,000 short records. The brute-force test checks both against enumeration.
 *
 * Each step's sums run over its support only — the true states its record allows (emission
 * likelihood above 0; every state at an unsurveyed step) — and over the previous step's: every term
 * left out is an exact +0 (a factor of 0 times finite numbers) added to a sum of non-negative terms
 * that started at +0, so the sums, and every number EM returns, are the same bits as over all k
 * states (test/chain/error-em-support.test.ts). Why: with an error matrix that confuses a state with its
 * neighbours only, a surveyed step allows about 3 of 8 states, and the E-step over all k was most of
 * the observer bench's EM (DEVELOPERS.md, Benchmarks).
 */
function addPattern(records: RecordPatterns, q: number, pi: Float64Array, p: Float64Array, e: Float64Array, k: number,
  work: { emissions: Float64Array; alpha: Float64Array; beta: Float64Array; scale: Float64Array; support: Int32Array; supportCount: Int32Array },
  out: { transitions: Float64Array; records: Float64Array; first: Float64Array; logLikelihood: number }): void {
  const T = patternLength(records, q);
  const n = records.sites[q]!;
  const { alpha, beta, scale, support, supportCount } = work;
  const em = patternEmissions(records, q, e, k, work.emissions);
  // support[t·k …]: the states s with em[t·k + s] > 0, increasing; supportCount[t] of them.
  for (let t = 0; t < T; t++) {
    let m = 0;
    for (let s = 0; s < k; s++) if (em[t * k + s]! > 0) support[t * k + m++] = s;
    supportCount[t] = m;
  }
  for (let t = 0; t < T; t++) {
    let c = 0;
    const row = t * k;
    for (let s = 0; s < k; s++) alpha[row + s] = 0;
    const m = supportCount[t]!;
    const before = (t - 1) * k;
    const m0 = t === 0 ? 0 : supportCount[t - 1]!;
    for (let i = 0; i < m; i++) {
      const s = support[row + i]!;
      let x: number;
      if (t === 0) x = pi[s]!;
      else {
        x = 0;
        for (let j = 0; j < m0; j++) {
          const r = support[before + j]!;
          x += alpha[before + r]! * p[r * k + s]!;
        }
      }
      x *= em[row + s]!;
      alpha[row + s] = x;
      c += x;
    }
    for (let i = 0; i < m; i++) alpha[row + support[row + i]!] /= c;
    scale[t] = c;
    out.logLikelihood += n * Math.log(c);
  }
  for (let i = 0; i < supportCount[T - 1]!; i++) beta[(T - 1) * k + support[(T - 1) * k + i]!] = 1;
  for (let t = T - 2; t >= 0; t--) {
    const next = (t + 1) * k;
    const m1 = supportCount[t + 1]!;
    const m = supportCount[t]!;
    for (let i = 0; i < m; i++) {
      const r = support[t * k + i]!;
      let x = 0;
      for (let j = 0; j < m1; j++) {
        const s = support[next + j]!;
        x += p[r * k + s]! * em[next + s]! * beta[next + s]!;
      }
      beta[t * k + r] = x / scale[t + 1]!;
    }
  }
  for (let i = 0; i < supportCount[0]!; i++) {
    const s = support[i]!;
    out.first[s] += n * alpha[s]! * beta[s]!;
  }
  for (let v = records.start[q]!; v < records.start[q + 1]!; v++) {
    const t = records.at[v]!;
    const cell = records.matrix[v]! * k * k + records.state[v]!;
    for (let i = 0; i < supportCount[t]!; i++) {
      const x = support[t * k + i]!;
      out.records[cell + x * k] += n * alpha[t * k + x]! * beta[t * k + x]!;
    }
  }
  for (let t = 0; t + 1 < T; t++) {
    const inv = n / scale[t + 1]!;
    const next = (t + 1) * k;
    const m1 = supportCount[t + 1]!;
    for (let i = 0; i < supportCount[t]!; i++) {
      const a = support[t * k + i]!;
      const from = alpha[t * k + a]!;
      if (from === 0) continue;
      for (let j = 0; j < m1; j++) {
        const b = support[next + j]!;
        out.transitions[a * k + b] += from * p[a * k + b]! * em[next + b]! * beta[next + b]! * inv;
      }
    }
  }
}
