import type { RandomStream } from './random.js';

/**
 * Draw one Dirichlet(α) vector into `out[offset … offset+n)` by normalising independent
 * Gamma(αⱼ, 1) variates (the standard construction; e.g. Devroye 1986, Non-Uniform Random Variate
 * Generation, ch. XI.4). Cells with αⱼ = 0 are structural zeros and stay exactly 0.
 *
 * With small parameters — a sparsely observed row under a 0.5 prior — every gamma variate can
 * underflow to 0 (Gamma(a) = Gamma(a+1)·U^(1/a) is tiny when a is small), leaving 0/0. The
 * Dirichlet then puts almost all its mass on one corner; we redraw, which samples the same
 * distribution conditioned on a representable result, and after MAX_REDRAWS we give the mass to
 * the largest α (the mode's direction) rather than return NaN.
 */
export function sampleDirichlet(random: Pick<RandomStream, 'gamma'>, alpha: ArrayLike<number>, alphaOffset: number,
  n: number, out: Float64Array, offset: number): void {
  for (let attempt = 0; attempt < MAX_REDRAWS; attempt++) {
    let total = 0;
    for (let j = 0; j < n; j++) {
      const a = alpha[alphaOffset + j]!;
      const g = a > 0 ? random.gamma(a) : 0;
      out[offset + j] = g;
      total += g;
    }
    if (total > 0 && Number.isFinite(total)) {
      for (let j = 0; j < n; j++) out[offset + j] /= total;
      return;
    }
  }
  let best = 0;
  for (let j = 1; j < n; j++) if (alpha[alphaOffset + j]! > alpha[alphaOffset + best]!) best = j;
  for (let j = 0; j < n; j++) out[offset + j] = j === best ? 1 : 0;
}

/** Redraws allowed when every gamma variate of a row underflows; at α ≥ 0.5 this never happens in practice. */
const MAX_REDRAWS = 16;
