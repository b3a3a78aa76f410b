import type { MatrixDraws } from '../uncertainty/draws.js';
import type { RunPlan } from './plan.js';
import { fillPlanMatrices, planWorkspace } from './plan-matrices.js';
import { multiplyInto } from '../chain/matrix.js';

/**
 * The posterior mean of Pʰ for each of `steps` (h ≥ 1): row i is the chance that a site in state i
 * now is in each state h steps on, averaged over the drawn matrices — E[Pʰ], not (E[P])ʰ, which
 * differ when the draws are spread. One k×k row-major matrix per step, in the order given.
 *
 * Work is draws × largest step × k³ and does not depend on how many sites (pixels) there are.
 */
export function meanMatrixPowers(draws: MatrixDraws, steps: readonly number[]): Float64Array[] {
  const { k, count, data } = draws;
  const k2 = k * k;
  const sums = steps.map(() => new Float64Array(k2));
  const products = new ProductWalk(k, steps);
  for (let d = 0; d < count; d++) products.add(data, () => d * k2, 1, sums);
  for (const sum of sums) for (let c = 0; c < k2; c++) sum[c]! /= count;
  return sums;
}

/**
 * The same under a scenario's management: each draw's year matrices are built as the engine builds
 * them (treatments, ramps, site-scope events: plan-matrices.ts), and each partial-area
 * sub-population's product is weighted by its share of the area — a pixel's chance when where the
 * treated parcels lie is not known. Landscape-scope events (random years per draw) are not folded
 * in; the caller refuses them.
 */
export function meanPlannedPowers(plan: RunPlan, draws: MatrixDraws, steps: readonly number[]): Float64Array[] {
  if (plan.trivial) return meanMatrixPowers(draws, steps);
  const { k, count, data } = draws;
  const k2 = k * k;
  const G = plan.subPopulations.length;
  const sums = steps.map(() => new Float64Array(k2));
  const ws = planWorkspace(plan);
  const products = new ProductWalk(k, steps);
  for (let d = 0; d < count; d++) {
    fillPlanMatrices(plan, data, d * k2, ws);
    plan.subPopulations.forEach((part, g) => products.add(ws.matrices, (h) => plan.planOf[h * G + g]! * k2, part.weight, sums));
  }
  for (const sum of sums) for (let c = 0; c < k2; c++) sum[c]! /= count;
  return sums;
}

/**
 * The running product of one draw's year matrices, P₁·P₂·…·Pₕ (row = from), added — times a weight —
 * into the sum for each wanted step h.
 */
class ProductWalk {
  private readonly horizon: number;
  private readonly power: Float64Array;
  private readonly next: Float64Array;

  constructor(private readonly k: number, private readonly steps: readonly number[]) {
    this.horizon = Math.max(0, ...steps);
    this.power = new Float64Array(k * k);
    this.next = new Float64Array(k * k);
  }

  /** Year h's matrix is `matrices` at offset `offsetOf(h)`. */
  add(matrices: Float64Array, offsetOf: (h: number) => number, weight: number, sums: Float64Array[]): void {
    const { k, steps } = this;
    const k2 = k * k;
    let power = this.power;
    let next = this.next;
    power.fill(0);
    for (let i = 0; i < k; i++) power[i * k + i] = 1;
    for (let h = 1; h <= this.horizon; h++) {
      const at = offsetOf(h);
      multiplyInto(power, matrices.subarray(at, at + k2), k, next);
      [power, next] = [next, power];
      steps.forEach((s, n) => { if (s === h) for (let c = 0; c < k2; c++) sums[n]![c] += weight * power[c]!; });
    }
  }
}
