/**
 * Standard normal variates by the polar method (Marsaglia & Bray 1964, "A convenient method for
 * generating normal variables", SIAM Review 6(3)): a point (u, v) uniform in the unit disc, found by
 * rejection from the square (accepted with chance π/4), gives two independent normals
 * u·√(−2 ln s / s) and v·√(−2 ln s / s), s = u² + v². Exact — no tables, no approximation — and
 * one logarithm and one square root per pair; the second normal of a pair is kept for the next call.
 */
export function polarNormals(uniform: () => number): () => number {
  let spare = 0;
  let hasSpare = false;
  return () => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    let u: number;
    let v: number;
    let s: number;
    do {
      u = 2 * uniform() - 1;
      v = 2 * uniform() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    spare = v * f;
    hasSpare = true;
    return u * f;
  };
}
