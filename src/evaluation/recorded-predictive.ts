import type { MatrixDraws } from '../uncertainty/draws.js';
import type { RandomStream } from '../uncertainty/random.js';
import type { SiteCase } from './site-cases.js';
import type { SitePredictive } from './site-predictive.js';
import { inverseCdfState } from '../uncertainty/categorical.js';

/**
 * Per-site forecasts on the recorded scale, for a chain fitted with observer error: what the next
 * survey would *record* at each site, so it can be scored fairly against what was recorded.
 *
 * Given draw d (its P, and its error matrix E from the same sampler sweep, MatrixDraws.emissions),
 * a site's true state at its last survey before the origin is the forward filter over its own
 * record (Rabiner 1989, §III.A; the model of chain/error-em.ts): α₀ ∝ π ⊙ E[·, r₀], then
 * αₙ ∝ (αₙ₋₁ · P^(aₙ − aₙ₋₁)) ⊙ E[·, rₙ] for its recorded states rₙ at steps aₙ. Its recorded state
 * g steps later is then distributed as q = α · Pᵍ · E. The predictive is the mean of q over the
 * draws, and each draw's predicted count of sites in each recorded state draws every site's record
 * from its own q — so the band holds the matrix's and the error matrix's uncertainty, and each
 * site's own chance of changing and of being mislabelled.
 *
 * With one error matrix per observer (MatrixDraws.observerEmissions) every survey of the filter is
 * weighed by its own observer's E of the draw (the matrix index in its history triple,
 * site-histories.ts), and q is recorded through the scored survey's own observer's matrix
 * (`targets`): q = α · Pᵍ · E_obs. Without, every index is 0 and E is the draw's one matrix.
 *
 * π, the mix of true states at a site's first survey, is the fit's maximum-likelihood value: the
 * sampler's sweeps keep P, E and the latest true mix, not π (its effect fades after a site's first
 * few surveys). A record that a draw's structural zeros cannot explain (filtered mass 0 — not
 * possible for records the fit was made from) keeps the filter's prediction without that survey.
 *
 * Sites with the same history, gap and scored survey's matrix share q: it is computed once per
 * draw for each distinct one.
 */
export function recordedPredictive(matrices: MatrixDraws, cases: readonly SiteCase[], histories: readonly Int32Array[],
  targets: Int32Array, initial: ArrayLike<number>, random: RandomStream): SitePredictive {
  const { k, count: D, data } = matrices;
  const emissions = matrices.observerEmissions ?? matrices.emissions;
  if (!emissions) throw new Error('internal: recorded-scale predictions need the draws\' error matrices');
  // Matrices per draw: 1 + observers with one per observer, else the one shared matrix.
  const m = matrices.observerEmissions ? 1 + matrices.observers!.length : 1;
  const k2 = k * k;
  const n = cases.length;
  const probabilities = new Float64Array(n * k);
  const counts = new Int32Array(k * D);
  const keyOf = new Map<string, number>();
  const group = cases.map((c, index) => {
    const key = `${c.gap}|${targets[index]}|${histories[index]!.join(',')}`;
    let g = keyOf.get(key);
    if (g === undefined) keyOf.set(key, g = keyOf.size);
    return g;
  });
  const firstOf = new Int32Array(keyOf.size).fill(-1);
  group.forEach((g, index) => { if (firstOf[g]! < 0) firstOf[g] = index; });
  const q = new Float64Array(keyOf.size * k);
  const alpha = new Float64Array(k);
  const next = new Float64Array(k);
  const uniform = random.uniform;
  for (let d = 0; d < D; d++) {
    const p = d * k2;
    const e = d * m * k2;
    for (let g = 0; g < keyOf.size; g++) {
      const index = firstOf[g]!;
      const history = histories[index]!;
      for (let x = 0; x < k; x++) alpha[x] = initial[x]!;
      let at = 0;
      for (let s = 0; s < history.length; s += 3) {
        stepForward(alpha, next, data, p, k, history[s]! - at);
        at = history[s]!;
        observe(alpha, emissions, e + history[s + 2]! * k2, k, history[s + 1]!);
      }
      stepForward(alpha, next, data, p, k, cases[index]!.gap);
      const through = e + targets[index]! * k2;
      for (let r = 0; r < k; r++) {
        let sum = 0;
        for (let x = 0; x < k; x++) sum += alpha[x]! * emissions[through + x * k + r]!;
        q[g * k + r] = sum;
      }
    }
    for (let index = 0; index < n; index++) {
      const at = group[index]! * k;
      for (let r = 0; r < k; r++) probabilities[index * k + r] += q[at + r]!;
      counts[inverseCdfState(q, at, k, uniform()) * D + d] += 1;
    }
  }
  for (let x = 0; x < n * k; x++) probabilities[x] /= D;
  return { probabilities, counts, draws: D };
}

/** α ← α · Pˢ (the draw's matrix at `offset`), s ≥ 0. */
function stepForward(alpha: Float64Array, next: Float64Array, data: ArrayLike<number>, offset: number, k: number, steps: number): void {
  for (let t = 0; t < steps; t++) {
    next.fill(0);
    for (let i = 0; i < k; i++) {
      const a = alpha[i]!;
      if (a === 0) continue;
      for (let j = 0; j < k; j++) next[j] += a * data[offset + i * k + j]!;
    }
    alpha.set(next);
  }
}

/** α ← α ⊙ E[·, r], renormalised; left as it was when no state could have been recorded as r. */
function observe(alpha: Float64Array, emissions: ArrayLike<number>, offset: number, k: number, recorded: number): void {
  let total = 0;
  for (let x = 0; x < k; x++) total += alpha[x]! * emissions[offset + x * k + recorded]!;
  if (!(total > 0)) return;
  for (let x = 0; x < k; x++) alpha[x] = (alpha[x]! * emissions[offset + x * k + recorded]!) / total;
}
