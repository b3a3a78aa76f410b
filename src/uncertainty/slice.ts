/**
 * One update of univariate slice sampling with stepping out and shrinkage (Neal 2003, "Slice
 * sampling", Ann. Statist. 31:705–767, figs. 3 and 5): draw a level under the density at x0, step
 * an interval of width w out until both ends lie outside the slice (at most maxSteps widths), then
 * sample uniformly within it, shrinking towards x0 on each rejection. It leaves the target
 * invariant for any w, so w only sets the speed. `logDensity` may be unnormalised and −Infinity.
 */
export function sliceStep(x0: number, logDensity: (x: number) => number, uniform: () => number,
  w: number, maxSteps: number, logAtX0 = logDensity(x0)): { x: number; logDensity: number } {
  const level = logAtX0 + Math.log(uniform()); // log(u·f(x0)); −Infinity only if uniform() gives 0
  let left = x0 - w * uniform();
  let right = left + w;
  let j = Math.floor(maxSteps * uniform());
  let k = maxSteps - 1 - j;
  while (j > 0 && level < logDensity(left)) { left -= w; j -= 1; }
  while (k > 0 && level < logDensity(right)) { right += w; k -= 1; }
  for (;;) {
    const x = left + uniform() * (right - left);
    const value = logDensity(x);
    if (level < value) return { x, logDensity: value };
    if (x < x0) left = x;
    else right = x;
    if (right - left <= COLLAPSED * (Math.abs(x0) + 1)) return { x: x0, logDensity: logAtX0 };
  }
}

/** An interval shrunk to this relative width around x0 has met rounding: x0 is kept (a valid, if lazy, update). */
const COLLAPSED = 1e-14;
