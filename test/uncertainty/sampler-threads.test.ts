import { describe, expect, it } from 'vitest';
import type { GapCell } from '../../src/chain/counts.js';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { fitMask, fitPrior, fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { surveyReadOptions, type FitSettings } from '../../src/fit/settings.js';
import type { LatentSample } from '../../src/fit/latent-sample.js';
import { STATES } from '../../scripts/heath-fixture.js';
import { augment } from '../../src/uncertainty/augment.js';
import { augmentErrors } from '../../src/uncertainty/augment-errors.js';
import { samplerThreads } from '../../src/uncertainty/chain-runner.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { sampleZonePosterior, type ZonePosterior } from '../../src/uncertainty/zone-posterior.js';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { fitWithCounts } from '../helpers.js';

/** Every number of a LatentSample, as plain arrays (NaN-safe through toEqual). */
function numbers(s: LatentSample): unknown {
  const own = s.errors?.observers;
  return {
    retained: s.retained, latent: Array.from(s.latent), rhat: Array.from(s.rhat), ess: Array.from(s.ess),
    ...(s.errors ? { emissions: Array.from(s.errors.emissions), latest: Array.from(s.errors.latest), erhat: Array.from(s.errors.rhat), eess: Array.from(s.errors.ess) } : {}),
    ...(own ? { observers: Array.from(own.emissions), orhat: Array.from(own.rhat), oess: Array.from(own.ess) } : {}),
  };
}

describe('the samplers\' chains on worker threads (chain-runner.ts)', () => {
  it('gap sampler: 1, 2 and 3 threads give the same LatentSample, bit for bit', () => {
    const fit = { ...fitWithCounts(['a', 'b', 'c'], [[20, 5, 2], [3, 15, 6], [0, 4, 18]], 'jeffreys', [['c', 'a']]),
      gapCounts: [[0, 1, 2, 6], [0, 2, 2, 4], [1, 0, 2, 3], [2, 2, 2, 9], [0, 0, 3, 5], [2, 1, 3, 2], [1, 2, 4, 3]] as GapCell[] };
    const settings = { chains: 4, warmUp: 50, retained: 200, thin: 2 };
    const [one, two, three] = [1, 2, 3].map((t) => augment(fit, settings, randomStreams(11).stream('augment'), t));
    expect(one!.latent.some((x) => x > 0)).toBe(true);
    expect(numbers(two!)).toEqual(numbers(one!));
    expect(numbers(three!)).toEqual(numbers(one!));
  });

  it('observer-error sampler with one matrix per observer: 1, 2 and 3 threads give the same LatentSample, bit for bit', () => {
    const settings: FitSettings = { ...DEFAULT_FIT_SETTINGS, states: [...STATES], impossible: [['mature-heath', 'bare-peat']], errors: 'test/fixtures/heath/accuracy-by-observer.csv' };
    const fit = fitSurvey(readSurveyCsv('test/fixtures/heath/surveys-two-observers.csv', surveyReadOptions(settings)), settings);
    const run = { chains: 3, warmUp: 20, retained: 30, thin: 1 };
    const [one, two, three] = [1, 2, 3].map((t) => augmentErrors(fit, run, randomStreams(5).stream('augment'), t));
    expect(one!.errors!.observers!.emissions.length).toBe(30 * 2 * STATES.length ** 2);
    expect(numbers(two!)).toEqual(numbers(one!));
    expect(numbers(three!)).toEqual(numbers(one!));
  });

  it('partial-pooling sampler (zone-posterior.ts), with and without gapped pairs: 1, 2 and 3 threads give the same samples, bit for bit', () => {
    // The zoned demo's fit, cut to 2 chains × 20 kept so the test stays short; four chains on three threads too.
    const demo = loadScenario('scenarios/brenhollow/zoned.yaml').fit;
    const zones = demo.zones!.zones;
    const k = demo.states.length;
    const counts = zones.map((z) => z.fit.counts);
    const samplesOf = (p: ZonePosterior): unknown => ({
      rows: p.rows.map((r) => r && { kappa: Array.from(r.kappa), mean: Array.from(r.mean) }), completed: p.completed && Array.from(p.completed),
    });
    for (const gaps of [zones.map((z) => z.fit.gapCounts ?? []), []]) {
      for (const chains of [2, 4]) {
        const settings = { chains, warmUp: 10, kept: 20, thin: 2 };
        const [one, two, three] = [1, 2, 3].map((t) => samplesOf(sampleZonePosterior(counts, fitMask(demo), fitPrior(demo), k,
          randomStreams(3).stream('matrices'), gaps, settings, t)));
        expect((one as { completed?: number[] }).completed?.length).toBe(gaps.length > 0 ? chains * 20 * zones.length * k * k : undefined);
        expect(two).toEqual(one);
        expect(three).toEqual(one);
      }
    }
  });

  it('asks for no more threads than chains, and one for a small job when none is asked', () => {
    const job = { kind: 'gaps' as const, k: 3, counts: new Float64Array(9), alpha: new Float64Array(9).fill(1), gapCounts: [[0, 1, 2, 6]] as GapCell[] };
    expect(samplerThreads(8, job, { chains: 4, warmUp: 10, retained: 40, thin: 1 })).toBe(4);
    expect(samplerThreads(undefined, job, { chains: 4, warmUp: 10, retained: 40, thin: 1 })).toBe(1);
    expect(samplerThreads(3, job, { chains: 1, warmUp: 10, retained: 40, thin: 1 })).toBe(1);
  });
});

describe('sere fit --threads', () => {
  it('prints the same fit JSON on 1 and 2 threads, and refuses 0 threads as a usage error (exit 2, as every bad flag value)', async () => {
    const { sereInProcess } = await import('../cli/in-process.js');
    const args = ['fit', 'test/fixtures/heath/surveys-two-observers.csv', '--errors', 'test/fixtures/heath/accuracy-by-observer.csv',
      '--states', STATES.join(','), '--impossible', 'mature-heath>bare-peat', '--json', '--seed', '4', '--chains', '2', '--warm-up', '10', '--retained', '20', '--thin', '1'];
    const one = await sereInProcess([...args, '--threads', '1']);
    const two = await sereInProcess([...args, '--threads', '2']);
    expect(one.code).toBe(0);
    expect(two.code).toBe(0);
    expect(two.stdout).toBe(one.stdout);
    expect((await sereInProcess([...args, '--threads', '0'])).code).toBe(2);
  });
});
