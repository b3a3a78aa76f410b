import type { MatrixDraws } from '../uncertainty/draws.js';
import type { RunPlan } from './plan.js';
import { fillPlanMatrices, planWorkspace } from './plan-matrices.js';

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
  const horizon = Math.max(0, ...steps);
  const sums = steps.map(() => new Float64Array(k2));
  const power = new Float64Array(k2);
  const next = new Float64Array(k2);
  for (let d = 0; d < count; d++) {
    const at = d * k2;
    power.fill(0);
    for (let i = 0; i < k; i++) power[i * k + i] = 1;
    for (let h = 1; h <= horizon; h++) {
      // next = power · P_d (row = from): the chance of each state h steps on.
      for (let i = 0; i < k; i++) {
        for (let j = 0; j < k; j++) {
          let x = 0;
          for (let l = 0; l < k; l++) x += power[i * k + l]! * data[at + l * k + j]!;
          next[i * k + j] = x;
        }
      }
      power.set(next);
      steps.forEach((s, n) => { if (s === h) for (let c = 0; c < k2; c++) sums[n]![c] += power[c]!; });
    }
  }
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
  const horizon = Math.max(0, ...steps);
  const sums = steps.map(() => new Float64Array(k2));
  const ws = planWorkspace(plan);
  const power = new Float64Array(k2);
  const next = new Float64Array(k2);
  for (let d = 0; d < count; d++) {
    fillPlanMatrices(plan, data, d * k2, ws);
    plan.subPopulations.forEach((part, g) => {
      power.fill(0);
      for (let i = 0; i < k; i++) power[i * k + i] = 1;
      for (let h = 1; h <= horizon; h++) {
        const at = plan.planOf[h * G + g]! * k2;
        for (let i = 0; i < k; i++) {
          for (let j = 0; j < k; j++) {
            let x = 0;
            for (let l = 0; l < k; l++) x += power[i * k + l]! * ws.matrices[at + l * k + j]!;
            next[i * k + j] = x;
          }
        }
        power.set(next);
        steps.forEach((s, n) => { if (s === h) for (let c = 0; c < k2; c++) sums[n]![c] += part.weight * power[c]!; });
      }
    });
  }
  for (const sum of sums) for (let c = 0; c < k2; c++) sum[c]! /= count;
  return sums;
}
