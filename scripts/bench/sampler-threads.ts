/**
 * `npm run bench -- sampler-threads` (only when named): what MIN_THREADED_SAMPLER_WORK
 * (src/uncertainty/chain-runner.ts) rests on. (1) The cost of starting a sampler worker: the demo's
 * gap sampler (DEFAULT_AUGMENT) on 2 threads in a fresh process's first call, less the same call
 * again on the workers kept; (2) the time per unit of work (workOf) on one thread, for the demo's
 * gap fit and the heath fixture's observer-error fit. Best of 3 for the repeatable parts.
 */
import { performance } from 'node:perf_hooks';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { fitPrior, fitSurvey, type Fit } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { errorSupport, matrixCount, stackedAssessment } from '../../src/fit/error-model.js';
import { surveyReadOptions, type FitSettings } from '../../src/fit/settings.js';
import { loadScenarios } from '../../src/scenario/load-scenario.js';
import { DEFAULT_AUGMENT, sampleLatent } from '../../src/uncertainty/augment.js';
import { workOf } from '../../src/uncertainty/chain-runner.js';
import type { SamplerJob } from '../../src/uncertainty/chain-kernel.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { STATES } from '../heath-fixture.js';

function jobOf(fit: Fit): SamplerJob {
  const k = fit.states.length;
  const model = fit.errorModel;
  if (!model) return { kind: 'gaps', k, counts: fit.counts, alpha: fitPrior(fit), gapCounts: fit.gapCounts ?? [] };
  return { kind: 'errors', k, m: matrixCount(model), counts: fit.counts, alpha: fitPrior(fit), support: errorSupport(model),
    assessment: stackedAssessment(model), records: model.records!, firstRecorded: new Float64Array(k) };
}

function ms(fn: () => void): number {
  const t = performance.now();
  fn();
  return performance.now() - t;
}

export function benchSamplerThreads(): void {
  const demo = loadScenarios('scenarios/brenhollow/no-action.yaml')[0]!.fit;
  const settings: FitSettings = { ...DEFAULT_FIT_SETTINGS, states: [...STATES], impossible: [['mature-heath', 'bare-peat']], errors: 'test/fixtures/heath/accuracy.csv' };
  const heath = fitSurvey(readSurveyCsv('test/fixtures/heath/surveys-observed.csv', surveyReadOptions(settings)), settings);
  const run = (fit: Fit, threads: number) => () => sampleLatent(fit, DEFAULT_AUGMENT, randomStreams(9).stream('augment'), threads);
  const one = Math.min(ms(run(demo, 1)), ms(run(demo, 1)), ms(run(demo, 1)));
  const first = ms(run(demo, 2));
  const kept = Math.min(ms(run(demo, 2)), ms(run(demo, 2)), ms(run(demo, 2)));
  console.log(`sampler threads: demo gap sampler (${DEFAULT_AUGMENT.chains} chains, ${workOf(jobOf(demo), DEFAULT_AUGMENT).toExponential(2)} units): ` +
    `1 thread ${one.toFixed(0)} ms · 2 threads, first call (starts a worker) ${first.toFixed(0)} ms · 2 threads, worker kept ${kept.toFixed(0)} ms · ` +
    `worker start ≈ ${(first - kept).toFixed(0)} ms`);
  for (const [name, fit] of [['demo gaps', demo], ['heath observer error', heath]] as const) {
    const work = workOf(jobOf(fit), DEFAULT_AUGMENT);
    const t = Math.min(ms(run(fit, 1)), ms(run(fit, 1)), ms(run(fit, 1)));
    console.log(`  ${name}: ${work.toExponential(2)} units in ${t.toFixed(0)} ms on one thread: ${(t * 1e6 / work).toFixed(2)} ns per unit`);
  }
}
