import { describe, expect, it } from 'vitest';
import { STATES } from '../../scripts/heath-fixture.js';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { surveyReadOptions, type FitSettings } from '../../src/fit/settings.js';
import { sampleLatent } from '../../src/uncertainty/augment.js';
import { drawMatrices } from '../../src/uncertainty/draw-matrices.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams } from '../../src/uncertainty/random.js';

const SETTINGS: FitSettings = {
  ...DEFAULT_FIT_SETTINGS, states: [...STATES], impossible: [['mature-heath', 'bare-peat']], errors: 'test/fixtures/heath/accuracy-by-observer.csv',
};
const k = STATES.length;
const kk = k * k;

describe('posterior draws with one error matrix per observer carry every observer\'s matrix of the draw\'s sweep', () => {
  const unsampled = fitSurvey(readSurveyCsv('test/fixtures/heath/surveys-two-observers.csv', surveyReadOptions(SETTINGS)), SETTINGS);
  const fit = { ...unsampled, latentSample: sampleLatent(unsampled, { chains: 2, warmUp: 5, retained: 8, thin: 1 }, randomStreams(11).stream('augment')) };
  const sweeps = fit.latentSample.errors!;

  it('matrix 0 is the pooled E of the draw (as `emissions`), matrices 1 + o observer o\'s of the same retained sweep; P and `emissions` unchanged', () => {
    const D = 40;
    const draws = posteriorDraws(fit, D, randomStreams(5));
    const without = posteriorDraws({ ...fit, latentSample: { ...fit.latentSample, errors: { ...sweeps, observers: undefined } } }, D, randomStreams(5));
    expect(draws.observers).toEqual(['Avery', 'Corran']);
    expect(draws.observerEmissions!.length).toBe(D * 3 * kk);
    // No random number is spent on the observers' matrices: P and the pooled E are those drawn without them.
    expect(draws.data).toEqual(without.data);
    expect(draws.emissions).toEqual(without.emissions);
    expect(without.observerEmissions).toBeUndefined();
    const seen = new Set<number>();
    for (let d = 0; d < D; d++) {
      const pooled = draws.emissions!.subarray(d * kk, (d + 1) * kk);
      expect(draws.observerEmissions!.subarray(d * 3 * kk, (d * 3 + 1) * kk)).toEqual(pooled);
      // The sweep whose pooled E this draw holds: its observers' matrices are the draw's.
      const r = [...Array(sweeps.emissions.length / kk).keys()].find((s) => sweeps.emissions.subarray(s * kk, (s + 1) * kk).every((x, c) => x === pooled[c]))!;
      expect(r).toBeGreaterThanOrEqual(0);
      seen.add(r);
      expect(draws.observerEmissions!.subarray((d * 3 + 1) * kk, (d * 3 + 3) * kk)).toEqual(sweeps.observers!.emissions.subarray(r * 2 * kk, (r + 1) * 2 * kk));
    }
    expect(seen.size).toBeGreaterThan(1);
  });

  it('drawMatrices (blocks in shared memory) keeps them too, block by block the same as posteriorDraws', () => {
    const D = 1500; // more than one block of draws
    const draws = drawMatrices(fit, 'posterior', D, randomStreams(6).stream('matrices'));
    expect(draws.observers).toEqual(['Avery', 'Corran']);
    expect(draws.observerEmissions!.length).toBe(D * 3 * kk);
    for (let d = 0; d < D; d += 97) expect(draws.observerEmissions!.subarray(d * 3 * kk, (d * 3 + 1) * kk)).toEqual(draws.emissions!.subarray(d * kk, (d + 1) * kk));
    // Every draw's matrices were filled (each row of each matrix sums to 1).
    for (let m = 0; m < D * 3 * k; m += 131) {
      let sum = 0;
      for (let c = 0; c < k; c++) sum += draws.observerEmissions![m * k + c]!;
      expect(sum).toBeCloseTo(1, 12);
    }
  });
});
