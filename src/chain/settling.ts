/** The usual "close enough to the long-run mix": total variation distance at most 5% (common practice). */
export const SETTLED_DISTANCE = 0.05;

/** Give up after this many steps: a chain this slow is reported as "more than" it. */
export const MAX_SETTLING_STEPS = 10_000;

/**
 * Steps until the projected mix is within `distance` of the stationary mix in total variation,
 * ½ Σ |x_t − π| (Levin, Peres & Wilmer 2009, ch. 4), starting from `start`; null if not within
 * MAX_SETTLING_STEPS (a periodic chain may never be).
 */
export function stepsToSettle(p: ArrayLike<number>, k: number, start: ArrayLike<number>, pi: ArrayLike<number>,
  offset = 0, distance = SETTLED_DISTANCE): number | null {
  let x = Float64Array.from(start);
  let y = new Float64Array(k);
  for (let t = 0; t <= MAX_SETTLING_STEPS; t++) {
    let tv = 0;
    for (let s = 0; s < k; s++) tv += Math.abs(x[s]! - pi[s]!);
    if (tv / 2 <= distance) return t;
    y.fill(0);
    for (let i = 0; i < k; i++) { const xi = x[i]!; if (xi !== 0) for (let j = 0; j < k; j++) y[j] += xi * p[offset + i * k + j]!; }
    [x, y] = [y, x];
  }
  return null;
}
