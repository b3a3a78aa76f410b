/**
 * Memory for the mixes of a chunk of years, [step][state][draw] for every draw, shared by the
 * scenarios run together. 96 MB holds one year of 1,000,000 draws × 10 states (80 MB), or 12 years
 * of 100,000: a chunk is one pass of the threads and one round of bands, and even a one-year chunk
 * of 10⁶ draws is 10⁸ multiply-adds, far more than the hand-over costs. It was 256 MB (3 years at
 * 10⁶ draws); at 96 MB the peak RSS of 1,000,000 draws × 100 years × 10 states fell from 1,521 to
 * 1,382 MB, with no measurable cost at 10⁵ draws (DEVELOPERS.md, Benchmarks).
 */
export const CHUNK_BYTES = 96 * 1024 ** 2;

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
