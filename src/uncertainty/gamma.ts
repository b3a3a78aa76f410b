/** The exp and log of a gamma's boost, U^(1/a) = exp(ln U / a) for shape a < 1. */
export interface Elementary {
  readonly exp: (x: number) => number;
  readonly log: (x: number) => number;
}

/**
 * Gamma(shape, rate 1) variates by Marsaglia & Tsang (2000, "A simple method for generating gamma
 * variables", ACM TOMS 26(3)). For shape a ≥ 1, with d = a − 1/3 and c = 1/√(9d): draw a standard
 * normal x until v = (1 + c·x)³ > 0 and accept d·v when a uniform u satisfies
 * u < 1 − 0.0331·x⁴ (the squeeze, taken about 98% of the time at a = 1 and more as a grows) or
 * ln u < x²/2 + d·(1 − v + ln v). For a < 1 (§6 of the paper) the boost
 * Gamma(a) = Gamma(a + 1)·U^(1/a). Exact given exact uniforms and normals (ziggurat normals, normal.ts).
 *
 * Written for sere, in place of stdlib's version of the same method (whose normals come from a
 * ziggurat through its generic generator interface), because posterior sampling draws one variate
 * per cell of every matrix draw; measured, see `random.ts`.
 */
export function gammaVariates(uniform: () => number, normal: () => number, elementary: Elementary = Math): (shape: number) => number {
  // Math's by default; the year kernel's own (year-kernel.ts kernelElementary) for the reference of its variates.
  const { exp, log } = elementary;
  const atLeastOne = (shape: number): number => {
    const d = shape - 1 / 3;
    const c = 1 / Math.sqrt(9 * d);
    for (;;) {
      let x: number;
      let v: number;
      do {
        x = normal();
        v = 1 + c * x;
      } while (v <= 0);
      v = v * v * v;
      const u = uniform();
      const x2 = x * x;
      if (u < 1 - 0.0331 * x2 * x2) return d * v;
      if (Math.log(u) < 0.5 * x2 + d * (1 - v + Math.log(v))) return d * v;
    }
  };
  // U^(1/a) as exp(ln U / a): V8's Math.pow with a fractional exponent measured 115–130 ns a call
  // against 60–85 ns for exp(ln U / a) (node 20, loaded 2-core machine), and a year matrix of small
  // transition chances takes the boost for most of its cells. The two differ by rounding only: an
  // error of an ulp in y = ln U / a is a relative error of |y|·2⁻⁵³ in exp(y), with |y| < 746.
  return (shape) => (shape >= 1 ? atLeastOne(shape) : atLeastOne(shape + 1) * exp(log(uniform()) / shape));
}
