/**
 * `npm run bench -- plot-kernel` (only when named): one plot step — 5,000 plots in 6 states moved on
 * by Multinomial(nᵢ, row i), as plot-counts.ts does each draw and year — in µs of user CPU
 * (process.cpuUsage, less disturbed by other processes than wall time), best of 5 after a warm-up:
 * multinomial.ts's JavaScript sampler (inversion and BTPE on the 32-bit-halves xoshiro256** of
 * xoshiro.ts) against the WebAssembly kernel's `moveRows` (assembly/year-kernel.ts: the same numbers
 * on native 64-bit words). The rows are those of `npm run bench -- plots`'s survey chain (stay 0.75,
 * one state on 0.17, the rest spread), so both inversion and BTPE run, as in the forecast.
 */
import { loadavg } from 'node:os';
import { multinomialSampler } from '../../src/uncertainty/multinomial.js';
import { generatorOfKey, streamKey } from '../../src/uncertainty/random.js';
import { yearKernel } from '../../src/uncertainty/year-kernel.js';

const K = 6;
const PLOTS = 5000;
const STEPS = 20_000;

function chainRows(): Float64Array {
  const P = new Float64Array(K * K);
  for (let i = 0; i < K; i++) {
    for (let j = 0; j < K; j++) P[i * K + j] = 0.08 / K;
    P[i * K + i]! += 0.75;
    P[i * K + Math.min(K - 1, i + 1)]! += 0.17;
  }
  return P;
}

/** Each step starts from the plots spread as the chain's run leaves them, fixed here: most in the last states. */
const START = Int32Array.of(400, 500, 600, 800, 1200, 1500);

function cpuMicros(run: () => void): number {
  let best = Infinity;
  for (let rep = 0; rep < 6; rep++) {
    const t = process.cpuUsage();
    run();
    const used = process.cpuUsage(t);
    if (rep > 0) best = Math.min(best, used.user + used.system);
  }
  return best;
}

export function benchPlotKernel(): void {
  const P = chainRows();
  const key = streamKey(1, 'plot-kernel-bench');
  const multinomial = multinomialSampler(generatorOfKey(key));
  const next = new Int32Array(K);
  const js = cpuMicros(() => {
    for (let s = 0; s < STEPS; s++) {
      next.fill(0);
      for (let i = 0; i < K; i++) multinomial(START[i]!, P, i * K, K, next, 0);
    }
  });
  const kernel = yearKernel(K, 1, 1, { matrices: K * K, counts: 2 * K });
  kernel.startStream(0, key, 0);
  kernel.matrices.set(P);
  kernel.counts.set(START);
  const wasm = cpuMicros(() => {
    for (let s = 0; s < STEPS; s++) {
      kernel.counts.fill(0, K);
      kernel.moveRows(0, kernel.matrices, 0, 0, K);
    }
  });
  if (START.reduce((a, n) => a + n, 0) !== PLOTS) throw new Error('the start is not 5,000 plots');
  console.log(`plot step, ${PLOTS} plots × ${K} states (µs of CPU a step, best of 5, load ${loadavg()[0]!.toFixed(1)}): ` +
    `JavaScript ${(js / STEPS).toFixed(2)}, WebAssembly ${(wasm / STEPS).toFixed(2)} (${(js / wasm).toFixed(1)}×)`);
}
