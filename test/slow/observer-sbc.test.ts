import { describe, expect, it } from 'vitest';
import { rankUniformityP } from '../helpers.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import type { SurveyRecord } from '../../src/data/survey.js';
import { recordPatterns } from '../../src/chain/record-patterns.js';
import { fitSurvey, type Fit } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { augmentErrors } from '../../src/uncertainty/augment-errors.js';
import { sampleDirichlet } from '../../src/uncertainty/dirichlet.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';
import { pickFrom } from '../error-helpers.js';

/**
 * The posterior with one error matrix per observer checked by simulation-based calibration (Talts
 * et al. 2018), as test/slow/error-sbc.test.ts does for one matrix. Each dataset draws the truth
 * from the model's own prior — P rows, each observer's E rows and the first-survey mix all
 * Dirichlet(½, ½, ½) — then each observer's accuracy assessment (30 sites per true state through
 * that observer's E) and 30 sites × 6 years through P with 30% of visits missed, each visit made
 * by one of the two observers at random and recorded through that observer's E. Both observers
 * are assessed, so no survey reads through the pooled matrix and the pooled matrix is no part of
 * this likelihood. The model takes a cell that no assessment saw as impossible for every observer
 * (fit/error-model.ts), so a dataset whose pooled assessment misses a cell is redrawn whole: the
 * condition depends on the data alone, so the truth is still one more draw from the posterior.
 */
const STATES = ['a', 'b', 'c'];
const K = 3;
const KK = K * K;
const ASSESSED = 30;
const RUN = { chains: 2, warmUp: 100, retained: 200, thin: 1 };

function dirichletRows(random: RandomStream, rows: number): Float64Array {
  const m = new Float64Array(rows * K);
  const alpha = new Float64Array(rows * K).fill(0.5);
  for (let i = 0; i < rows; i++) sampleDirichlet(random, alpha, i * K, K, m, i * K);
  return m;
}

function dataset(random: RandomStream, sites: number, years: number, missed: number): { fit: Fit; p: Float64Array; e: Float64Array } {
  for (;;) {
    const p = dirichletRows(random, K);
    // Observer 0's rows, then observer 1's.
    const e = dirichletRows(random, 2 * K);
    const pi = dirichletRows(random, 1);
    const assessments = new Float64Array(2 * KK);
    for (let o = 0; o < 2; o++) {
      for (let x = 0; x < K; x++) for (let n = 0; n < ASSESSED; n++) assessments[o * KK + x * K + pickFrom(random, e.subarray(o * KK + x * K, o * KK + (x + 1) * K))] += 1;
    }
    const pooled = Float64Array.from({ length: KK }, (_, c) => assessments[c]! + assessments[KK + c]!);
    if (pooled.some((n) => n === 0)) continue;
    const records: SurveyRecord[] = [];
    for (let s = 0; s < sites; s++) {
      let state = pickFrom(random, pi);
      for (let t = 0; t < years; t++) {
        if (t > 0) state = pickFrom(random, p.subarray(state * K, (state + 1) * K));
        if (t === 0 || random.uniform() >= missed) {
          const o = random.integer(2);
          records.push({ site: `s${s}`, time: 2000 + t, state: pickFrom(random, e.subarray(o * KK + state * K, o * KK + (state + 1) * K)), observer: `o${o}`, line: records.length + 2 });
        }
      }
    }
    const table = tableFromRecords('sim.csv', STATES, records);
    // Built directly (the CLI reads the assessment from a file): the ErrorModel error-fit.ts makes,
    // observer o's surveys through matrix 1 + o.
    const matrixOfObserver = Int32Array.from(table.observers!, (name) => 1 + Number(name.slice(1)));
    const base = fitSurvey(table, DEFAULT_FIT_SETTINGS);
    const fit: Fit = {
      ...base,
      errorModel: {
        file: 'sim-errors.csv', sha256: '', assessment: pooled, droppedRows: 0, records: recordPatterns(table.rows, 1, matrixOfObserver), trueTransitions: 0,
        observers: { names: ['o0', 'o1'], assessments, unassessed: [], pooledSurveys: 0, notSurveyed: [] },
      },
    };
    return { fit: { ...fit, latentSample: augmentErrors(fit, RUN, random.stream('augment')) }, p, e };
  }
}

describe('simulation-based calibration with one error matrix per observer (Talts et al. 2018)', () => {
  it('ranks of a true P cell and a cell of each observer\'s E among 99 posterior draws are uniform over 200 datasets (χ², 9 df, each of 3 cells at 0.001: family false alarm ≤ 0.3%)', () => {
    const DATASETS = 200;
    const L = 99;
    // P[a → b]; observer 0's E[a recorded as b]; observer 1's E[b recorded as c].
    const cells: { name: string; truth: (p: Float64Array, e: Float64Array) => number; drawn: (s: ReturnType<typeof sweepsOf>, r: number) => number }[] = [
      { name: 'P a→b', truth: (p) => p[1]!, drawn: (s, r) => s.p[r * KK + 1]! },
      { name: 'E(o0) a→b', truth: (_, e) => e[1]!, drawn: (s, r) => s.observers[(r * 2) * KK + 1]! },
      { name: 'E(o1) b→c', truth: (_, e) => e[KK + K + 2]!, drawn: (s, r) => s.observers[(r * 2 + 1) * KK + K + 2]! },
    ];
    const bins = cells.map(() => new Array<number>(10).fill(0));
    const root = randomStreams(20261202);
    for (let n = 0; n < DATASETS; n++) {
      const random = root.stream(`dataset:${n}`);
      const { fit, p, e } = dataset(random, 30, 6, 0.3);
      const sweeps = sweepsOf(fit, random.stream('p-draws'));
      const pick = random.stream('pick');
      cells.forEach((cell, c) => {
        let rank = 0;
        for (let d = 0; d < L; d++) if (cell.drawn(sweeps, pick.integer(sweeps.retained)) < cell.truth(p, e)) rank += 1;
        bins[c]![Math.min(9, Math.floor(rank / 10))] += 1;
      });
    }
    cells.forEach((cell, c) => {
      const pValue = rankUniformityP(bins[c]!);
      if (process.env['SERE_SHOW'] === '1') console.log(cell.name, 'p', pValue, bins[c]!.join(' '));
      expect(pValue, `${cell.name}: ranks by tenth ${bins[c]!.join(' ')}`).toBeGreaterThan(0.001);
    });
  });
});

/**
 * Each retained sweep's P drawn from Dirichlet(prior + that sweep's true transitions) — what a
 * posterior matrix draw is (uncertainty/posterior.ts) — beside the observers' matrices of the same sweep.
 */
function sweepsOf(fit: Fit, random: RandomStream): { retained: number; p: Float64Array; observers: Float64Array } {
  const sample = fit.latentSample!;
  const p = new Float64Array(sample.retained * KK);
  const params = new Float64Array(KK);
  for (let r = 0; r < sample.retained; r++) {
    for (let c = 0; c < KK; c++) params[c] = 0.5 + sample.latent[r * KK + c]!;
    for (let i = 0; i < K; i++) sampleDirichlet(random, params, i * K, K, p, r * KK + i * K);
  }
  return { retained: sample.retained, p, observers: sample.errors!.observers!.emissions };
}
