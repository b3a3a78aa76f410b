import { maxGap } from '../chain/bridges.js';
import { matrixPowers } from '../chain/matrix.js';
import { bridgeScratch, sampleBridges } from './bridge-sampler.js';
import type { ChainKernel, GapJob } from './chain-kernel.js';
import { sampleDirichlet } from './dirichlet.js';
import { multinomialSampler } from './multinomial.js';
import type { RandomStream } from './random.js';

/**
 * One chain of the gap sampler (augment.ts): the chain starts from a draw of the posterior given
 * the one-step counts alone (more spread than the target, as R̂ wants); a sweep draws the bridges
 * of every gap cell given P (bridge-sampler.ts), then each row of P from
 * Dirichlet(prior + observed + latent one-step counts). Retained: the latent counts; traced: P.
 */
export function gapKernel(job: GapJob, stream: RandomStream): ChainKernel {
  const { k, counts, alpha, gapCounts } = job;
  const kk = k * k;
  const g = maxGap(gapCounts);
  const multinomial = multinomialSampler(stream);
  const posterior = new Float64Array(kk);
  const completed = new Float64Array(kk);
  const p = new Float64Array(kk);
  const scratch = bridgeScratch(k);
  const drawP = (): void => {
    for (let cell = 0; cell < kk; cell++) posterior[cell] = alpha[cell]! > 0 ? alpha[cell]! + counts[cell]! + completed[cell]! : 0;
    for (let i = 0; i < k; i++) sampleDirichlet(stream, posterior, i * k, k, p, i * k);
  };
  return {
    start: drawP,
    sweep() {
      const powers = matrixPowers(p, k, g);
      completed.fill(0);
      for (const cell of gapCounts) sampleBridges(p, k, powers, cell, multinomial, completed, scratch);
      drawP();
    },
    keep(row, outputs, trace) {
      outputs[0]!.set(completed, row * kk);
      trace.set(p);
    },
  };
}
