/**
 * The two reference forecasts every score is set beside, and their smoothing: one owner for the
 * rule. Additive smoothing by ½ per state (the Jeffreys / Krichevsky–Trofimov pseudo-count — common
 * practice, so that a state seen where the reference gave it nothing scores a large but finite
 * log score instead of −ln 0 = ∞).
 */
export const BASELINE_SMOOTHING = 0.5;

/**
 * Climatology: every site gets the landscape mix at the forecast origin, (cⱼ + ½) / (N + ½k)
 * for cⱼ of the N sites surveyed then in state j.
 */
export function climatologyForecast(originCounts: readonly number[]): Float64Array {
  const k = originCounts.length;
  const n = originCounts.reduce((a, b) => a + b, 0);
  return Float64Array.from(originCounts, (c) => (c + BASELINE_SMOOTHING) / (n + BASELINE_SMOOTHING * k));
}

/**
 * Persistence ("nothing changes"): the site stays in its last recorded state, smoothed by ½ per
 * state against the N sites surveyed at the origin — (N·[j = i] + ½) / (N + ½k). Weighting the
 * site as N observations makes the smoothing shrink as the survey grows, and makes the per-site
 * forecasts average to the smoothed origin mix, i.e. to climatology for a landscape that stays put.
 */
export function persistenceForecast(from: number, originSites: number, k: number): Float64Array {
  const out = new Float64Array(k).fill(BASELINE_SMOOTHING / (originSites + BASELINE_SMOOTHING * k));
  out[from] = (originSites + BASELINE_SMOOTHING) / (originSites + BASELINE_SMOOTHING * k);
  return out;
}
