/**
 * `node dist/scripts/bench-sampling.js old|new`: milliseconds for 100,000 posterior draws of a
 * 10-state matrix, best of 3, with the random stream before (MT19937 + stdlib's gamma) or now.
 * A process of its own for each, as in a real run: timed in one process, the two kinds of stream
 * make the sampler's call sites polymorphic and slow both down (measured: the new one by ~30%).
 */
import { performance } from 'node:perf_hooks';
import type { Fit } from '../src/fit/fit.js';
import { posteriorDraws } from '../src/uncertainty/posterior.js';
import { randomStreams } from '../src/uncertainty/random.js';
import { oldRandomStreams } from './bench-old-random.js';
import { SiteCountTable } from '../src/chain/site-counts.js';

const D = 100_000;
const K = 10;
const fit: Fit = {
  input: { file: 'bench', sha256: '' }, states: Array.from({ length: K }, (_, s) => `s${s}`), step: 1, prior: 'jeffreys',
  impossible: [], counts: Float64Array.from({ length: K * K }, (_, c) => (c % (K + 1) === 0 ? 40 : 3)), sites: SiteCountTable.fromList(K, []),
  transitions: 0, skipped: [], repeatedRows: 0, surveys: 0, firstTime: 0,
  latest: { time: 0, counts: [], shares: [], sites: 0 },
};
const streams = process.argv[2] === 'old' ? oldRandomStreams : randomStreams;
let fastest = Infinity;
for (let run = 0; run < 3; run++) {
  const t = performance.now();
  posteriorDraws(fit, D, streams(2));
  fastest = Math.min(fastest, performance.now() - t);
}
console.log(fastest.toFixed(1));
