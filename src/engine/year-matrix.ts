import { blockCount, blockName } from '../uncertainty/draw-blocks.js';
import { keyOf, type RandomStream } from '../uncertainty/random.js';
import type { YearKernel } from '../uncertainty/year-kernel.js';

/**
 * Year-to-year variation: each year's matrix is drawn around the draw's, row i ~ Dirichlet(κᵢ · Pᵢ),
 * so the year's row has the drawn row as its mean and cell variance Pᵢⱼ(1 − Pᵢⱼ)/(κᵢ + 1). A row
 * with κᵢ = Infinity is copied (it does not vary); structural zeros (Pᵢⱼ = 0) stay zero. The
 * WebAssembly year kernel (uncertainty/year-kernel.ts) draws them: the draw's matrix is set once
 * (`setDraw`), then each year's from that step's stream (`sample`), k gamma variates per varying row —
 * always every row, whatever the mix, so alternatives run on the same streams meet the same years
 * (common random numbers).
 */
/**
 * The keys of the year-matrix streams: block b of draws (draw-blocks.ts), step t, from
 * `random.stream('block:b').stream('step:t')`, at `(b*(horizon+1) + t)*8`. One stream per block
 * and step, taken by the block's draws in order, so a draw's years are the same however the run is
 * cut into chunks of years and whichever thread runs its block. Made once, on the calling thread.
 */
export function yearStreamKeys(random: RandomStream, draws: number, horizon: number): Uint32Array {
  const steps = horizon + 1;
  const blocks = blockCount(draws);
  const keys = new Uint32Array(new SharedArrayBuffer(blocks * steps * 8 * 4));
  for (let b = 0; b < blocks; b++) {
    const block = random.stream(blockName(b));
    for (let t = 1; t < steps; t++) keys.set(keyOf(block.stream(`step:${t}`)), (b * steps + t) * 8);
  }
  return keys;
}

/** Start block b's year streams for steps from … to − 1 as the kernel's streams t − from (step 0 has none). */
export function startYearStreams(kernel: YearKernel, keys: Uint32Array, block: number, horizon: number, from: number, to: number): void {
  const steps = horizon + 1;
  for (let t = Math.max(from, 1); t < to; t++) kernel.startStream(t - from, keys, (block * steps + t) * 8);
}
