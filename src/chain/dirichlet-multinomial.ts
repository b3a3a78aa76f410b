import gammaln from '@stdlib/math-base-special-gammaln';

/**
 * The Dirichlet–multinomial (Pólya) distribution: counts n over m categories, N = Σ n, when the
 * category probabilities are themselves drawn from Dirichlet(a), A = Σ a (Mosimann 1962,
 * Biometrika 49:65–82; Minka 2000, "Estimating a Dirichlet distribution", eq. 51):
 *
 *   log P(n | a) = log N! − Σ log nⱼ! + log Γ(A) − log Γ(A + N) + Σ [log Γ(aⱼ + nⱼ) − log Γ(aⱼ)].
 *
 * It is the distribution of one survey period's transitions out of a state when each year's row
 * varies around a mean row p as Dirichlet(κ·p) (a = κ·p): the likelihood that estimates κ.
 * Cells with aⱼ = 0 (structural zeros) must have nⱼ = 0 and are skipped. The Γ ratios are taken as
 * rising factorials (logRising), which keeps their digits when a is large.
 */
export function dirichletMultinomialLogPmf(n: ArrayLike<number>, a: ArrayLike<number>): number {
  let N = 0;
  let A = 0;
  let value = 0;
  for (let j = 0; j < n.length; j++) {
    const nj = n[j]!;
    const aj = a[j]!;
    if (aj === 0) {
      if (nj !== 0) return -Infinity;
      continue;
    }
    N += nj;
    A += aj;
    value += logRising(aj, nj) - gammaln(nj + 1);
  }
  return value + gammaln(N + 1) - logRising(A, N);
}

/**
 * Moments of Dirichlet–multinomial counts (Mosimann 1962): with p = a/A,
 * E nⱼ = N pⱼ and Var nⱼ = N pⱼ (1 − pⱼ) (N + A)/(1 + A) — the multinomial variance inflated by
 * (N + A)/(1 + A), which tends to 1 as A → ∞ (years alike) and to N as A → 0.
 */
export function dirichletMultinomialMoments(N: number, a: ArrayLike<number>): { mean: number[]; variance: number[] } {
  let A = 0;
  for (let j = 0; j < a.length; j++) A += a[j]!;
  const inflation = (N + A) / (1 + A);
  const mean: number[] = [];
  const variance: number[] = [];
  for (let j = 0; j < a.length; j++) {
    const p = a[j]! / A;
    mean.push(N * p);
    variance.push(N * p * (1 - p) * inflation);
  }
  return { mean, variance };
}

/**
 * log Γ(a + n) − log Γ(a), the rising factorial's logarithm, for n ≥ 0 (whole, or fractional as
 * the zones' completed counts with gaps are: expected transitions inside bridges). Three exact-enough paths:
 * a sum of logs for small whole n; for a ≥ STIRLING_FROM the difference of Stirling's series written so
 * nothing large cancels, (a − ½)·log1p(n/a) + n·log(a + n) − n + c(a + n) − c(a) with
 * c(x) = 1/(12x) − 1/(360x³) + 1/(1260x⁵) (Abramowitz & Stegun 6.1.41; the next term is below
 * 1e-17 there) — the difference of two log-gammas of 2e10 would keep only five digits; otherwise
 * the log-gammas themselves (stdlib).
 */
export function logRising(a: number, n: number): number {
  if (n === 0) return 0;
  if (n <= RISING_BY_SUM && Number.isInteger(n)) {
    let s = 0;
    for (let m = 0; m < n; m++) s += Math.log(a + m);
    return s;
  }
  if (a >= STIRLING_FROM) {
    const b = a + n;
    return (a - 0.5) * Math.log1p(n / a) + n * Math.log(b) - n + stirlingTail(b) - stirlingTail(a);
  }
  return gammaln(a + n) - gammaln(a);
}

function stirlingTail(x: number): number {
  const r = 1 / x;
  const r2 = r * r;
  return r * (1 / 12 - r2 * (1 / 360 - r2 / 1260));
}

/** Below this many terms the sum of logs is used: a few Math.log calls cost less than two log-gammas. */
const RISING_BY_SUM = 8;
/** From here on Stirling's series to x⁻⁵ is exact to double precision (A&S 6.1.41). */
const STIRLING_FROM = 100;
