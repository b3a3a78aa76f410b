import { describe, expect, it } from 'vitest';
import { rankUniformityP } from '../helpers.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import type { SurveyRecord } from '../../src/data/survey.js';
import { recordPatterns } from '../../src/chain/record-patterns.js';
import { fitSurvey, type Fit } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { augmentErrors } from '../../src/uncertainty/augment-errors.js';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import { pickFrom } from '../error-helpers.js';

/**
 * The observer-error posterior (gaps + error matrix) checked by simulation (Talts et al. 2018).
 * Each dataset draws the truth from the model's own prior — P rows Dirichlet(½, ½, ½), E rows
 * Dirichlet(½, ½, ½), the first-survey mix Dirichlet(½, ½, ½) — then an accuracy assessment of 40
 * sites per true state through E, and 30 sites × 6 years through P and E with 30% of visits missed.
 * The model takes a cell of E that the assessment never saw as impossible, so a dataset whose
 * assessment misses a cell is redrawn whole: the condition depends on the data alone, so the
 * posterior given the data is unchanged and the truth is still one more draw from it.
 */
const STATES = ['a', 'b', 'c'];
const K = 3;
const ASSESSED = 40;

function dirichletRows(random: RandomStream, rows: number): Float64Array {
  const m = new Float64Array(rows * K);
  const alpha = new Float64Array(rows * K).fill(0.5);
  for (let i = 0; i < rows; i++) sampleDirichlet(random, alpha, i * K, K, m, i * K);
  return m;
}

interface Dataset { fit: Fit; p: Float64Array; e: Float64Array; trueLast: Float64Array }

/** Short runs for the rank test; the coverage test runs longer, since with error the paths and E mix slowly (2 × 100 + 150 kept gave 85% coverage of 90% bands, 2 × 500 + 500 kept every third 91%). */
const SHORT = { chains: 2, warmUp: 100, retained: 300, thin: 1 };
const LONGER = { chains: 2, warmUp: 300, retained: 600, thin: 2 };

function dataset(random: RandomStream, sites: number, years: number, missed: number, run = SHORT): Dataset {
  for (;;) {
    const p = dirichletRows(random, K);
    const e = dirichletRows(random, K);
    const pi = dirichletRows(random, 1);
    const assessment = new Float64Array(K * K);
    for (let x = 0; x < K; x++) for (let n = 0; n < ASSESSED; n++) assessment[x * K + pickFrom(random, e.subarray(x * K, (x + 1) * K))] += 1;
    if (assessment.some((n) => n === 0)) continue;
    const records: SurveyRecord[] = [];
    const trueLast = new Float64Array(K);
    for (let s = 0; s < sites; s++) {
      let state = pickFrom(random, pi);
      for (let t = 0; t < years; t++) {
        if (t > 0) state = pickFrom(random, p.subarray(state * K, (state + 1) * K));
        if (t === 0 || random.uniform() >= missed) {
          records.push({ site: `s${s}`, time: 2000 + t, state: pickFrom(random, e.subarray(state * K, (state + 1) * K)), line: records.length + 2 });
        }
      }
      trueLast[state] += 1 / sites;
    }
    const table = tableFromRecords('sim.csv', STATES, records);
    // Built directly (the CLI reads the assessment from a file): the same ErrorModel fitSurvey makes.
    const base = fitSurvey(table, DEFAULT_FIT_SETTINGS);
    const fit: Fit = { ...base, errorModel: { file: 'sim-errors.csv', sha256: '', assessment, droppedRows: 0, records: recordPatterns(table.rows, 1), trueTransitions: 0 } };
    return { fit: { ...fit, latentSample: augmentErrors(fit, run, random.stream('augment')) }, p, e, trueLast };
  }
}

describe('simulation-based calibration of the observer-error posterior (Talts et al. 2018)', () => {
  it('ranks of the true P and E cells among 99 posterior draws are uniform over 200 datasets (χ², 9 df, each of 18 cells at 0.001: family false alarm ≤ 1.8%)', () => {
    const DATASETS = 200;
    const L = 99;
    const bins = Array.from({ length: 2 * K * K }, () => new Array<number>(10).fill(0));
    const root = randomStreams(20261203);
    for (let n = 0; n < DATASETS; n++) {
      const random = root.stream(`dataset:${n}`);
      const { fit, p, e } = dataset(random, 30, 6, 0.3);
      const draws = posteriorDraws(fit, L, random.stream('draws'), fit.latentSample);
      const sample = fit.latentSample!;
      const pick = random.stream('error-draws');
      const ranks = new Array<number>(2 * K * K).fill(0);
      for (let d = 0; d < L; d++) {
        const r = pick.integer(sample.retained);
        for (let c = 0; c < K * K; c++) {
          if (draws.data[d * K * K + c]! < p[c]!) ranks[c] += 1;
          if (sample.errors!.emissions[r * K * K + c]! < e[c]!) ranks[K * K + c] += 1;
        }
      }
      ranks.forEach((rank, c) => { bins[c]![Math.min(9, Math.floor(rank / 10))] += 1; });
    }
    for (let c = 0; c < 2 * K * K; c++) {
      const p = rankUniformityP(bins[c]!);
      if (process.env['SERE_SHOW'] === '1') console.log(c < K * K ? 'P' : 'E', c % (K * K), 'p', p, bins[c]!.join(' '));
      expect(p, `${c < K * K ? 'P' : 'E'} cell ${c % (K * K)}: ranks by tenth ${bins[c]!.join(' ')}`).toBeGreaterThan(0.001);
    }
  });

  it('90% bands of the 10-year-ahead expected true mix cover the truth 90% ± 3% of the time (250 histories, 30% of visits missed, observer error)', () => {
    // Each draw starts from its own sweep's true latest mix and runs its own matrix. 250 histories
    // × 3 states = 750 (correlated) checks: a binomial standard error of about 1.1 points, so ± 3
    // points is nearly 3 standard errors (a false alarm about 1% if the bands are right).
    const HISTORIES = 250;
    const D = 400;
    const root = randomStreams(78);
    let inside = 0;
    let total = 0;
    for (let n = 0; n < HISTORIES; n++) {
      const random = root.stream(`history:${n}`);
      const { fit, p, trueLast } = dataset(random, 30, 6, 0.3, LONGER);
      const want = project(trueLast, 0, p, 0, 10);
      const draws = posteriorDraws(fit, D, random.stream('draws'), fit.latentSample);
      for (let s = 0; s < K; s++) {
        const shares = Array.from({ length: D }, (_, d) => project(draws.starts!, d * K, draws.data, d * K * K, 10)[s]!).sort((x, y) => x - y);
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

function project(x0: Float64Array, x0Offset: number, p: Float64Array, offset: number, steps: number): Float64Array {
  let x = x0.slice(x0Offset, x0Offset + K);
  for (let t = 0; t < steps; t++) {
    const next = new Float64Array(K);
    for (let i = 0; i < K; i++) for (let j = 0; j < K; j++) next[j] += x[i]! * p[offset + i * K + j]!;
    x = next;
  }
  return x;
}
