/**
 * EM accelerated by SQUAREM (Varadhan & Roland 2008, Scand. J. Statist. 35: 335–353): from θ₀ take
 * two EM steps θ₁ = F(θ₀), θ₂ = F(θ₁); with r = θ₁ − θ₀ and v = θ₂ − 2θ₁ + θ₀, extrapolate to
 * θ' = θ₀ + 2αr + α²v, α = ‖r‖/‖v‖ (their scheme S3), then stabilise with one more EM step
 * θ'' = F(θ'). α is at least 1 (α = 1 gives θ' = θ₂: plain EM) and at most a bound that grows
 * fourfold each time it is reached and shrinks when a step fails (as in the authors' SQUAREM
 * package, step.max0 = 1, mstep = 4).
 *
 * θ' is an affine combination of three parameter vectors (coefficients summing to 1), so rows that
 * sum to 1 still do and structural zeros stay zero; it is used only if no cell that is positive at
 * θ₂ became zero or negative and its likelihood is at least θ₁'s — otherwise the cycle ends at θ₂
 * (as plain EM would). So, like EM, every cycle raises the likelihood (it ends at F(θ'), which is
 * at least θ'’s) and the fixed points are EM's: the same maximum, reached in fewer E-steps.
 *
 * Stops as EM did: when an EM step moves no cell by more than `tolerance`, at the point that step
 * reached; `iterations` counts EM steps (F evaluations), at most `maxIterations` (a budget too small
 * for a cycle takes plain EM steps, so 1 is one EM step). `expect(θ)` is the E-step (with the
 * log-likelihood at θ), `maximise` the M-step.
 */
export function acceleratedEm<S extends { readonly logLikelihood: number }>(expect: (theta: Float64Array) => S, maximise: (step: S) => Float64Array,
  start: Float64Array, maxIterations: number, tolerance: number): { theta: Float64Array; step: S; iterations: number; converged: boolean } {
  let theta = start;
  let step = expect(theta);
  let iterations = 0;
  let stepMax = 1;
  while (iterations < maxIterations) {
    const one = maximise(step);
    iterations += 1;
    if (largestChange(one, theta) < tolerance) return { theta: one, step: expect(one), iterations, converged: true };
    const stepOne = expect(one);
    if (maxIterations - iterations < 2) {
      theta = one;
      step = stepOne;
      continue;
    }
    const two = maximise(stepOne);
    iterations += 1;
    if (largestChange(two, one) < tolerance) return { theta: two, step: expect(two), iterations, converged: true };
    let rr = 0;
    let vv = 0;
    for (let c = 0; c < theta.length; c++) {
      const r = one[c]! - theta[c]!;
      const v = two[c]! - 2 * one[c]! + theta[c]!;
      rr += r * r;
      vv += v * v;
    }
    const alpha = Math.max(1, Math.min(stepMax, vv > 0 ? Math.sqrt(rr / vv) : 1));
    if (alpha === stepMax) stepMax *= 4;
    const jump = new Float64Array(theta.length);
    let feasible = true;
    for (let c = 0; c < theta.length; c++) {
      const r = one[c]! - theta[c]!;
      const v = two[c]! - 2 * one[c]! + theta[c]!;
      const x = theta[c]! + 2 * alpha * r + alpha * alpha * v;
      // Exactly 0 where all three are 0 (a structural zero); never ≤ 0 where EM keeps a cell positive.
      jump[c] = two[c] === 0 && one[c] === 0 && theta[c] === 0 ? 0 : x;
      if (two[c]! > 0 ? !(x > 0) : x < 0) feasible = false;
    }
    const stepJump = feasible ? expect(jump) : undefined;
    if (stepJump && stepJump.logLikelihood >= stepOne.logLikelihood) {
      theta = maximise(stepJump);
      iterations += 1;
      step = expect(theta);
    } else {
      theta = two;
      step = expect(two);
      stepMax = Math.max(1, stepMax / 4);
    }
  }
  return { theta, step, iterations, converged: false };
}

function largestChange(a: Float64Array, b: Float64Array): number {
  let change = 0;
  for (let c = 0; c < a.length; c++) change = Math.max(change, Math.abs(a[c]! - b[c]!));
  return change;
}
