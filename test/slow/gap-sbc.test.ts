import { describe, expect, it } from 'vitest';
import { projectMix, rankUniformityP } from '../helpers.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import type { SurveyRecord } from '../../src/data/survey.js';
import { fitSurvey, type Fit } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { augment } from '../../src/uncertainty/augment.js';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';

/**
 * The gap posterior checked by simulation. Each dataset: a true matrix drawn from the prior
 * (Jeffreys, Dirichlet(½, ½, ½) rows), a survey history simulated from it with 30% of visits
 * missed (the first always made), fitted with every pair (EM + data augmentation, short runs: 2
 * chains × 100 warm-up + 200 kept). If the posterior is right, the truth is one more draw from it.
 */
const STATES = ['a', 'b', 'c'];
const K = 3;

function truthFromPrior(random: RandomStream): Float64Array {
  const p = new Float64Array(K * K);
  const alpha = new Float64Array(K * K).fill(0.5);
  for (let i = 0; i < K; i++) sampleDirichlet(random, alpha, i * K, K, p, i * K);
  return p;
}

function history(p: Float64Array, sites: number, years: number, missed: number, random: RandomStream): { fit: Fit; last: Float64Array } {
  const records: SurveyRecord[] = [];
  const last = new Float64Array(K);
  for (let s = 0; s < sites; s++) {
    let state = random.integer(K);
    for (let t = 0; t < years; t++) {
      if (t > 0) {
        let u = random.uniform();
        let next = 0;
        while (next < K - 1 && u >= p[state * K + next]!) { u -= p[state * K + next]!; next += 1; }
        state = next;
      }
      if (t === 0 || random.uniform() >= missed) records.push({ site: `s${s}`, time: 2000 + t, state, line: records.length + 2 });
    }
    last[state] += 1 / sites;
  }
  const fit = fitSurvey(tableFromRecords('sim.csv', STATES, records), DEFAULT_FIT_SETTINGS);
  return { fit: { ...fit, latentSample: augment(fit, { chains: 2, warmUp: 100, retained: 400, thin: 1 }, random.stream('augment')) }, last };
}

describe('simulation-based calibration of the gap posterior (Talts et al. 2018)', () => {
  it('ranks of the true cells among 99 posterior draws are uniform over 200 datasets (χ², 9 df, each cell at 0.001: family false alarm ≤ 0.9%)', () => {
    const DATASETS = 200;
    const L = 99;
    const bins = Array.from({ length: K * K }, () => new Array<number>(10).fill(0));
    const root = randomStreams(20261202);
    let gapped = 0;
    for (let n = 0; n < DATASETS; n++) {
      const random = root.stream(`dataset:${n}`);
      const truth = truthFromPrior(random);
      const { fit } = history(truth, 30, 6, 0.3, random);
      gapped += fit.gapCounts!.length > 0 ? 1 : 0;
      const draws = posteriorDraws(fit, L, random.stream('draws'), fit.latentSample);
      for (let c = 0; c < K * K; c++) {
        let rank = 0;
        for (let d = 0; d < L; d++) if (draws.data[d * K * K + c]! < truth[c]!) rank += 1;
        bins[c]![Math.min(9, Math.floor(rank / 10))] += 1;
      }
    }
    expect(gapped).toBe(DATASETS);
    for (let c = 0; c < K * K; c++) {
      const p = rankUniformityP(bins[c]!);
      if (process.env['SERE_SHOW'] === '1') console.log('cell', c, 'p', p);
      expect(p, `cell ${c}: ranks by tenth ${bins[c]!.join(' ')}`).toBeGreaterThan(0.001);
    }
  });

  it('90% bands of the 10-step-ahead expected mix cover the truth 90% ± 3% of the time (400 histories, 30% of visits missed)', () => {
    // The truth is drawn from the prior, so a calibrated posterior covers at its level on average.
    // 400 histories × 3 states = 1,200 (correlated) checks: a binomial standard error of about 0.9
    // points, so ± 3 points is over 3 standard errors.
    const HISTORIES = 400;
    const D = 400;
    const root = randomStreams(77);
    let inside = 0;
    let total = 0;
    for (let n = 0; n < HISTORIES; n++) {
      const random = root.stream(`history:${n}`);
      const truth = truthFromPrior(random);
      const { fit, last } = history(truth, 30, 6, 0.3, random);
      const want = projectMix(truth, 0, Array.from(last), 10);
      const draws = posteriorDraws(fit, D, random.stream('draws'), fit.latentSample);
      for (let s = 0; s < K; s++) {
        const shares = Array.from({ length: D }, (_, d) => projectMix(draws.data, d * K * K, Array.from(last), 10)[s]!).sort((x, y) => x - y);
        const low = shares[Math.floor(0.05 * (D - 1))]!;
        const high = shares[Math.ceil(0.95 * (D - 1))]!;
        inside += want[s]! >= low && want[s]! <= high ? 1 : 0;
        total += 1;
      }
    }
    const coverage = inside / total;
    if (process.env['SERE_SHOW'] === '1') console.log('coverage', coverage);
    expect(coverage).toBeGreaterThan(0.87);
    expect(coverage).toBeLessThan(0.93);
  });
});

