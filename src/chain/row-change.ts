/**
 * A management change to one from-row of a transition matrix.
 *
 * - `multiply`: pᵢⱼ ← f·pᵢⱼ for each listed destination j;
 * - `set`: pᵢⱼ ← v for each listed destination j;
 * - `move`: a share s of the probability of going to `from` goes to `to` instead:
 *   pᵢ,from ← (1 − s)·pᵢ,from and pᵢ,to ← pᵢ,to + s·pᵢ,from (the row sum is unchanged).
 *
 * After `multiply` or `set`, the destinations not listed are rescaled together, in proportion to
 * their current values, so the row sums to 1: pᵢₖ ← pᵢₖ · (1 − Σ listed) / (Σ not listed). Zeros
 * (structural or not) stay zero.
 */
export type RowChange =
  | { readonly kind: 'multiply'; readonly cells: readonly { readonly to: number; readonly value: number }[] }
  | { readonly kind: 'set'; readonly cells: readonly { readonly to: number; readonly value: number }[] }
  | { readonly kind: 'move'; readonly from: number; readonly to: number; readonly share: number };

/**
 * `capped`: the listed destinations would have summed above 1, so they were scaled down to sum to 1
 * and every other destination set to 0. `unmet`: nothing was left to rescale (every other
 * destination is 0) and the listed ones do not sum to 1, so the row was left unchanged.
 */
export type RowChangeOutcome = 'ok' | 'capped' | 'unmet';

/** Slack when comparing a row's listed total with 1 (floating-point sums of a few terms). */
export const ROW_CHANGE_TOLERANCE = 1e-12;

/**
 * Apply `change` at strength `weight` (0 = no effect, 1 = full; in between, the row is the convex
 * combination (1 − w)·before + w·after, which is how a treatment ramps in) to the row at `offset`
 * of `p`, in place. `scratch` needs room for k numbers. The row stays stochastic in every outcome.
 */
export function changeRow(p: Float64Array, offset: number, k: number, change: RowChange, weight: number, scratch: Float64Array): RowChangeOutcome {
  if (weight <= 0) return 'ok';
  for (let j = 0; j < k; j++) scratch[j] = p[offset + j]!;
  let outcome: RowChangeOutcome = 'ok';
  if (change.kind === 'move') {
    if (change.from !== change.to) {
      const moved = change.share * scratch[change.from]!;
      scratch[change.from] -= moved;
      scratch[change.to] += moved;
    }
  } else {
    outcome = rescaleAround(scratch, k, change);
    if (outcome === 'unmet') return outcome;
  }
  for (let j = 0; j < k; j++) p[offset + j] = (1 - weight) * p[offset + j]! + weight * scratch[j]!;
  return outcome;
}

function rescaleAround(row: Float64Array, k: number, change: Extract<RowChange, { cells: unknown }>): RowChangeOutcome {
  let others = 0;
  for (let j = 0; j < k; j++) others += row[j]!;
  let listed = 0;
  for (const { to, value } of change.cells) {
    others -= row[to]!;
    row[to] = change.kind === 'multiply' ? row[to]! * value : value;
    listed += row[to]!;
  }
  if (listed > 1 + ROW_CHANGE_TOLERANCE) {
    for (let j = 0; j < k; j++) row[j] = listedIn(change.cells, j) ? row[j]! / listed : 0;
    return 'capped';
  }
  // `others` was found by subtraction: clear rounding dust before deciding it is empty.
  if (others <= ROW_CHANGE_TOLERANCE) {
    if (Math.abs(listed - 1) > ROW_CHANGE_TOLERANCE) return 'unmet';
    for (let j = 0; j < k; j++) if (!listedIn(change.cells, j)) row[j] = 0;
    return 'ok';
  }
  const scale = Math.max(0, 1 - listed) / others;
  for (let j = 0; j < k; j++) if (!listedIn(change.cells, j)) row[j] *= scale;
  return 'ok';
}

/** Whether destination j is one of `cells`: a loop, not `cells.some` with a fresh callback, as this runs every treated year of every draw with year-to-year variation. */
function listedIn(cells: readonly { readonly to: number }[], j: number): boolean {
  for (let c = 0; c < cells.length; c++) if (cells[c]!.to === j) return true;
  return false;
}
