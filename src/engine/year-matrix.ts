import { sampleDirichlet } from '../uncertainty/dirichlet.js';
import { blockCount, blockName } from '../uncertainty/draw-blocks.js';
import { generatorOfKey, keyOf, type RandomStream } from '../uncertainty/random.js';

export type YearStream = Pick<RandomStream, 'gamma'>;

/**
 * One year's matrix around a drawn one (year-to-year variation): row i ~ Dirichlet(κᵢ · Pᵢ), so
 * the year's row has the drawn row as its mean and cell variance Pᵢⱼ(1 − Pᵢⱼ)/(κᵢ + 1). A row with
 * κᵢ = Infinity is copied (it does not vary); structural zeros (Pᵢⱼ = 0) stay zero. Draws k
 * gamma variates per varying row from `stream` — always every row, whatever the mix, so
 * alternatives run on the same streams meet the same years (common random numbers).
 */
export function sampleYearMatrix(P: Float64Array, offset: number, k: number, concentration: Float64Array, cOffset: number,
  stream: YearStream, alpha: Float64Array, out: Float64Array): void {
  for (let i = 0; i < k; i++) {
    const kappa = concentration[cOffset + i]!;
    const row = offset + i * k;
    if (kappa === Infinity) {
      for (let j = 0; j < k; j++) out[i * k + j] = P[row + j]!;
      continue;
    }
    for (let j = 0; j < k; j++) alpha[j] = kappa * P[row + j]!;
    sampleDirichlet(stream, alpha, 0, k, out, i * k);
  }
}

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

/** The generators of block b's year streams for steps from … to − 1 (index t − from; step 0 has none). */
export function yearStreams(keys: Uint32Array, block: number, horizon: number, from: number, to: number): YearStream[] {
  const steps = horizon + 1;
  const out: YearStream[] = [];
  for (let t = from; t < to; t++) out.push(t === 0 ? { gamma: () => { throw new Error('step 0 has no year matrix'); } } : generatorOfKey(keys, (block * steps + t) * 8));
  return out;
}
