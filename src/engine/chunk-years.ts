/**
 * Memory for the mixes of a chunk of years, [step][state][draw] for every draw, shared by the
 * scenarios run together. 256 MB holds 3 years of 1,000,000 draws × 10 states, or 33 years of
 * 100,000: enough that summarising a year (its bands) costs far more than the pass that fills it,
 * and small beside the matrix draws themselves (D × k² doubles: 800 MB at 1,000,000 × 10 states).
 */
export const CHUNK_BYTES = 256 * 1024 ** 2;

/** How many recorded years a chunk holds: as many as fit in `budget` bytes, at least one. */
export function yearsPerChunk(draws: number, k: number, scenarios: number, budget = CHUNK_BYTES): number {
  return Math.max(1, Math.floor(budget / (draws * k * 8 * scenarios)));
}

/**
 * Cut steps 0 … horizon into chunks [from, to) holding at most `perChunk` of the `kept` steps
 * each (the steps whose mixes a summary reads); the last chunk ends at the horizon. Steps between
 * kept ones cost time, not memory, and ride along in whichever chunk reaches the next kept step.
 */
export function chunksOf(kept: readonly number[], horizon: number, perChunk: number): { from: number; to: number; kept: number[] }[] {
  const chunks: { from: number; to: number; kept: number[] }[] = [];
  let from = 0;
  for (let n = 0; n < kept.length; n += perChunk) {
    const part = kept.slice(n, n + perChunk);
    const to = n + perChunk >= kept.length ? horizon + 1 : part[part.length - 1]! + 1;
    chunks.push({ from, to, kept: part });
    from = to;
  }
  return chunks;
}
