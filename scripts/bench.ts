/**
 * `npm run bench`: engine throughput and demo wall time. Speed is measured here, never in tests.
 *
 * 1. Engine: propagate 100,000 draws × 100 years × 10 states (random stochastic matrices), reported
 *    as draws·years·states² per second, best of 3 runs on one core.
 * 2. Posterior sampling: 100,000 draws of a 10-state matrix (1e6 Dirichlet rows).
 * 3. Demo forecast: wall time of `sere forecast` on the demo scenario, start-up included (best of 5).
 */
import { spawnSync } from 'node:child_process';
import { performance } from 'node:perf_hooks';
import { propagate } from '../src/engine/propagate.js';
import { posteriorDraws } from '../src/uncertainty/posterior.js';
import { seededRandom } from '../src/uncertainty/random.js';
import type { MatrixDraws } from '../src/uncertainty/draws.js';
import type { Fit } from '../src/fit/fit.js';

function randomDraws(count: number, k: number, seed: number): MatrixDraws {
  const random = seededRandom(seed);
  const data = new Float64Array(count * k * k);
  for (let r = 0; r < count * k; r++) {
    let total = 0;
    for (let j = 0; j < k; j++) { const w = random.uniform(); data[r * k + j] = w; total += w; }
    for (let j = 0; j < k; j++) data[r * k + j] /= total;
  }
  return { k, count, data, source: 'point', notes: [] };
}

function best<T>(runs: number, fn: () => T): number {
  let fastest = Infinity;
  for (let n = 0; n < runs; n++) {
    const t = performance.now();
    fn();
    fastest = Math.min(fastest, performance.now() - t);
  }
  return fastest;
}

const D = 100_000;
const H = 100;
const K = 10;
const draws = randomDraws(D, K, 1);
const start = new Float64Array(K).fill(1 / K);
const work = D * H * K * K;
const engine = (label: string, record?: number[]): void => {
  const ms = best(3, () => propagate(draws, start, H, { target: { state: 0, share: 0.5 }, record }));
  console.log(`engine, ${label}: ${D} draws × ${H} years × ${K} states: ${(ms / 1000).toFixed(2)} s, ` +
    `${(work / (ms / 1000) / 1e6).toFixed(0)} M draws·years·states²/s (target: under 5 s)`);
};
// Five reporting years, as a terminal table shows; then every year (808 MB of shares).
engine('5 years kept', [0, 5, 10, 20, 50, 100]);
engine('every year kept', undefined);

const states = Array.from({ length: K }, (_, s) => `s${s}`);
const fit: Fit = {
  input: { file: 'bench', sha256: '' }, states, step: 1, prior: 'jeffreys', impossible: [],
  counts: Float64Array.from({ length: K * K }, (_, c) => (c % (K + 1) === 0 ? 40 : 3)), sites: [], transitions: 0,
  skipped: [], repeatedRows: 0, surveys: 0, firstTime: 0,
  latest: { time: 0, counts: [], shares: [], sites: 0 },
};
const samplingMs = best(3, () => posteriorDraws(fit, D, seededRandom(2)));
console.log(`posterior sampling: ${D} draws of a ${K}-state matrix: ${(samplingMs / 1000).toFixed(2)} s`);

const demoMs = best(5, () => {
  const r = spawnSync(process.execPath, ['dist/sere.mjs', 'forecast', 'scenarios/brenhollow/no-action.yaml'], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(r.stderr);
});
console.log(`demo forecast (scenarios/brenhollow/no-action.yaml, 4000 draws × 50 years), wall incl. start-up: ${(demoMs / 1000).toFixed(3)} s (target: under 0.5 s)`);
