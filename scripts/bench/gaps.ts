/**
 * `npm run bench -- gaps`: the gap model at scale. 10,000 sites × 12 yearly surveys × 8 states,
 * 30% of the visits after each site's first missed, simulated from a fixed chain; then, timed each:
 * the count (with the gap tally), EM for the MLE, the data-augmentation sampler (4 chains × 250
 * warm-up + 250 kept = 1,000 retained sweeps), and 1,000 posterior matrix draws from the retained
 * sweeps. Reports retained draws per second and the smallest bulk ESS per second of sampler time.
 * One run (the sampler alone is many seconds); the target is under 20 s wall for all of it.
 */
import { availableParallelism } from 'node:os';
import { performance } from 'node:perf_hooks';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import type { SurveyRecord } from '../../src/data/survey.js';
import { fitMle, fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { augment, DEFAULT_AUGMENT } from '../../src/uncertainty/augment.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams } from '../../src/uncertainty/random.js';

const SITES = 10_000;
const SURVEYS = 12;
const K = 8;
const MISSED = 0.3;

export function benchGaps(): void {
  const random = randomStreams(31);
  // A chain that mostly stays, moves to neighbours and sometimes jumps: every cell possible.
  const p = new Float64Array(K * K);
  for (let i = 0; i < K; i++) {
    for (let j = 0; j < K; j++) p[i * K + j] = i === j ? 20 : Math.abs(i - j) === 1 ? 3 : 0.5;
    const total = p.subarray(i * K, (i + 1) * K).reduce((a, b) => a + b, 0);
    for (let j = 0; j < K; j++) p[i * K + j] /= total;
  }
  const states = Array.from({ length: K }, (_, s) => `s${s}`);
  const records: SurveyRecord[] = [];
  for (let s = 0; s < SITES; s++) {
    let state = random.integer(K);
    for (let t = 0; t < SURVEYS; t++) {
      if (t > 0) {
        let u = random.uniform();
        let next = 0;
        while (next < K - 1 && u >= p[state * K + next]!) { u -= p[state * K + next]!; next += 1; }
        state = next;
      }
      if (t === 0 || random.uniform() >= MISSED) records.push({ site: `site${s}`, time: 2000 + t, state, line: records.length + 2 });
    }
  }
  const start = performance.now();
  let t = performance.now();
  const fit = fitSurvey(tableFromRecords('bench.csv', states, records), DEFAULT_FIT_SETTINGS);
  const countMs = performance.now() - t;
  t = performance.now();
  const mle = fitMle(fit);
  const emMs = performance.now() - t;
  t = performance.now();
  const sample = augment(fit, DEFAULT_AUGMENT, randomStreams(32).stream('augment'));
  const samplerMs = performance.now() - t;
  t = performance.now();
  posteriorDraws(fit, 1000, randomStreams(33), sample);
  const drawsMs = performance.now() - t;
  const wallMs = performance.now() - start;
  const ess = Array.from(sample.ess).filter(Number.isFinite);
  const rhat = Array.from(sample.rhat).filter(Number.isFinite);
  const pairs = fit.pairsByGap!.map((g) => `${g.pairs} at ${g.gap}`).join(', ');
  console.log(`gaps: ${SITES} sites × ${SURVEYS} surveys × ${K} states, ${MISSED * 100}% of visits missed: ${records.length} surveys; pairs by gap ${pairs}; ${fit.gapCounts!.length} gap cells`);
  console.log(`  count ${(countMs / 1000).toFixed(2)} s · EM ${(emMs / 1000).toFixed(2)} s (${mle.iterations} iterations) · ` +
    `sampler ${(samplerMs / 1000).toFixed(2)} s (${DEFAULT_AUGMENT.chains} chains on ${Math.min(DEFAULT_AUGMENT.chains, availableParallelism())} threads × ${DEFAULT_AUGMENT.warmUp} warm-up + ${sample.retained / DEFAULT_AUGMENT.chains} kept) · ` +
    `1,000 matrix draws ${(drawsMs / 1000).toFixed(3)} s · wall ${(wallMs / 1000).toFixed(2)} s (target: under 20 s)`);
  console.log(`  retained sweeps per second ${(sample.retained / (samplerMs / 1000)).toFixed(0)} (all sweeps ${((DEFAULT_AUGMENT.warmUp * DEFAULT_AUGMENT.chains + sample.retained) / (samplerMs / 1000)).toFixed(0)}/s) · ` +
    `smallest bulk ESS ${Math.min(...ess).toFixed(0)}, ESS per second ${(Math.min(...ess) / (samplerMs / 1000)).toFixed(0)} · largest R̂ ${Math.max(...rhat).toFixed(4)}`);
}
