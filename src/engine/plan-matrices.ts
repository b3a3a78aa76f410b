import { changeRow, type RowChangeOutcome } from '../chain/row-change.js';
import type { RunPlan } from './plan.js';

/** Scratch space for building one draw's year matrices, allocated once per run. */
export interface PlanWorkspace {
  readonly matrices: Float64Array;
  readonly row: Float64Array;
  readonly product: Float64Array;
}

export function planWorkspace(plan: RunPlan): PlanWorkspace {
  const k2 = plan.k * plan.k;
  return { matrices: new Float64Array(plan.plans.length * k2), row: new Float64Array(plan.k), product: new Float64Array(k2) };
}

/**
 * Build every year recipe's matrix for one draw into `ws.matrices`: copy the drawn matrix, apply
 * the treatments in order, then fold in each site-scope event as T ← T·((1 − c)I + cE) — a site
 * makes its yearly transition and is then hit with chance c, independently of other sites.
 * `onOutcome` hears of every change that was capped or could not be met. With zones, recipe p
 * starts from its zone's matrix, `zoneStride` further on per zone (MatrixDraws.zones).
 */
export function fillPlanMatrices(plan: RunPlan, base: Float64Array, baseOffset: number, ws: PlanWorkspace,
  onOutcome?: (treatment: number, outcome: RowChangeOutcome) => void, zoneStride = 0): void {
  for (let p = 0; p < plan.plans.length; p++) fillRecipe(plan, p, base, baseOffset + plan.plans[p]!.zone * zoneStride, ws, onOutcome);
}

/** Build recipe p's matrix alone from `base` (a year's matrix, with year-to-year variation), as fillPlanMatrices does. */
export function fillRecipe(plan: RunPlan, p: number, base: Float64Array, baseOffset: number, ws: PlanWorkspace,
  onOutcome?: (treatment: number, outcome: RowChangeOutcome) => void): void {
  const at = p * plan.k * plan.k;
  for (let c = 0; c < plan.k * plan.k; c++) ws.matrices[at + c] = base[baseOffset + c]!;
  changeRecipe(plan, p, ws, onOutcome);
}

/** A recipe with nothing to change: every step it names is the drawn (or year) matrix itself, read in place. */
export function unchangedRecipe(plan: RunPlan, p: number): boolean {
  return plan.plans[p]!.changes.length === 0 && plan.plans[p]!.siteEvents.length === 0;
}

/** Recipe p's changes, applied to the matrix already copied to `ws.matrices[p·k² …]` (fillRecipe's second half). */
export function changeRecipe(plan: RunPlan, p: number, ws: PlanWorkspace,
  onOutcome?: (treatment: number, outcome: RowChangeOutcome) => void): void {
  const { k } = plan;
  const k2 = k * k;
  const recipe = plan.plans[p]!;
  const at = p * k2;
  // Indexed loops, not for…of with destructuring: with variation this runs every treated year of every draw.
  for (let c = 0; c < recipe.changes.length; c++) {
    const { treatment, weight } = recipe.changes[c]!;
    const tr = plan.treatments[treatment]!;
    const outcome = changeRow(ws.matrices, at + tr.row * k, k, tr.change, weight, ws.row);
    if (outcome !== 'ok') onOutcome?.(treatment, outcome);
  }
  for (let c = 0; c < recipe.siteEvents.length; c++) {
    const { event, chance } = recipe.siteEvents[c]!;
    const E = plan.events[event]!.matrix;
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let hit = 0;
        for (let l = 0; l < k; l++) hit += ws.matrices[at + i * k + l]! * E[l * k + j]!;
        ws.product[i * k + j] = (1 - chance) * ws.matrices[at + i * k + j]! + chance * hit;
      }
    }
    ws.matrices.set(ws.product, at);
  }
}
