import digamma from '@stdlib/math-base-special-digamma';
import { logRising } from './dirichlet-multinomial.js';
import type { RowPeriods } from './row-periods.js';

/**
 * The maximum-likelihood Dirichlet–multinomial parameters a = κ·p of one row from its periods, by
 * Minka's fixed point (Minka 2000, "Estimating a Dirichlet distribution", eq. 55):
 *
 *   aⱼ ← aⱼ · Σₜ [ψ(nₜⱼ + aⱼ) − ψ(aⱼ)] / Σₜ [ψ(Nₜ + A) − ψ(A)],
 *
 * which increases the likelihood at every step. For whole counts each digamma difference is the
 * finite sum Σ_{m<n} 1/(a + m), exact; fractional counts (zones with gaps) take the digamma for the
 * fraction. When the periods agree no better than
 * multinomial sampling allows, the likelihood keeps rising as κ grows and the maximum is at
 * κ = ∞ (no year-to-year variation): reported as Infinity once κ passes KAPPA_INFINITE.
 */
export function concentrationMle(r: RowPeriods): { kappa: number; mean: Float64Array; iterations: number } {
  const m = r.cells.length;
  const T = r.totals.length;
  const pooled = new Float64Array(m);
  for (let t = 0; t < T; t++) for (let c = 0; c < m; c++) pooled[c] += r.counts[t * m + c]!;
  let N = 0;
  for (const n of pooled) N += n;
  const mean = Float64Array.from(pooled, (n) => (n + 0.5) / (N + 0.5 * m));
  // Start from a moderate concentration around the smoothed pooled row.
  const a = Float64Array.from(mean, (p) => 10 * p);
  for (let iteration = 1; iteration <= MAX_ITERATIONS; iteration++) {
    let A = 0;
    for (const x of a) A += x;
    let denominator = 0;
    for (let t = 0; t < T; t++) denominator += digammaDifference(A, r.totals[t]!);
    let change = 0;
    for (let c = 0; c < m; c++) {
      let numerator = 0;
      for (let t = 0; t < T; t++) numerator += digammaDifference(a[c]!, r.counts[t * m + c]!);
      const next = denominator > 0 ? (a[c]! * numerator) / denominator : a[c]!;
      change = Math.max(change, Math.abs(Math.log(next / a[c]!)));
      a[c] = next;
    }
    let kappa = 0;
    for (const x of a) kappa += x;
    if (kappa > KAPPA_INFINITE || change < TOLERANCE || iteration === MAX_ITERATIONS) {
      // Near κ = ∞ the fixed point crawls: compare with the limit itself, the multinomial at the pooled row.
      const limit = Float64Array.from(pooled, (n) => n / N);
      if (kappa > KAPPA_INFINITE || logLikelihood(r, limit, Infinity) >= logLikelihood(r, a, 1)) {
        return { kappa: Infinity, mean: limit, iterations: iteration };
      }
      return { kappa, mean: Float64Array.from(a, (x) => x / kappa), iterations: iteration };
    }
  }
  throw new Error('unreachable');
}

/**
 * Σₜ log P(nₜ | scale·a) without the multinomial coefficients (the same for every parameter);
 * scale = Infinity: the multinomial with probabilities a.
 */
function logLikelihood(r: RowPeriods, a: Float64Array, scale: number): number {
  const m = r.cells.length;
  let value = 0;
  let A = 0;
  for (const x of a) A += x;
  for (let t = 0; t < r.totals.length; t++) {
    if (scale === Infinity) {
      for (let c = 0; c < m; c++) { const n = r.counts[t * m + c]!; if (n > 0) value += n * Math.log(a[c]! / A); }
      continue;
    }
    value -= logRising(A * scale, r.totals[t]!);
    for (let c = 0; c < m; c++) value += logRising(a[c]! * scale, r.counts[t * m + c]!);
  }
  return value;
}

/**
 * ψ(a + n) − ψ(a): for whole n the finite sum Σ_{m<n} 1/(a + m), exact; a fractional n (a zone's
 * completed counts with gaps hold expected transitions) adds ψ(a + n) − ψ(a + ⌊n⌋) by stdlib's digamma.
 */
function digammaDifference(a: number, n: number): number {
  const whole = Math.floor(n);
  let s = 0;
  for (let m = 0; m < whole; m++) s += 1 / (a + m);
  // ψ is increasing, so the fraction's part is ≥ 0; for a tiny fraction the difference of two
  // nearly equal digammas can round below zero, which would turn aⱼ negative.
  if (n > whole) s += Math.max(0, digamma(a + n) - digamma(a + whole));
  return s;
}

/** Beyond this concentration a year's row differs from the mean by under 0.05 points (sd ≤ 0.5/√κ): counted as no variation. */
export const KAPPA_INFINITE = 1e6;
/** Largest relative change of any parameter at which the fixed point is taken as converged. */
const TOLERANCE = 1e-10;
const MAX_ITERATIONS = 20_000;
