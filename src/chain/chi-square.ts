import gammainc from '@stdlib/math-base-special-gammainc';

/**
 * Upper tail of the chi-square distribution, P(X²_df ≥ x), computed directly as the regularized
 * upper incomplete gamma function Q(df/2, x/2) (stdlib), not as 1 − CDF — which would round every
 * p-value below about 1e-16 to zero. df = 0 (nothing left to test) gives 1.
 */
export function chiSquareUpperTail(x: number, df: number): number {
  if (df <= 0) return 1;
  if (!(x > 0)) return 1;
  return gammainc(x / 2, df / 2, true, true);
}
