import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { SereError } from '../src/errors.js';
import { chiSquareUpperTail } from '../src/chain/chi-square.js';
import { tableFromRecords } from '../src/data/survey-rows.js';
import fc from 'fast-check';
import { multiply, matrix, type Matrix } from 'mathjs';
import type { MatrixDraws } from '../src/uncertainty/draws.js';
import type { Fit } from '../src/fit/fit.js';
import type { Disturbance, LandscapeTarget, Scenario, Treatment } from '../src/scenario/scenario.js';
import type { RowChange } from '../src/chain/row-change.js';
import { SiteCountTable } from '../src/chain/site-counts.js';

/** A random row-stochastic k×k matrix (weights normalised per row), for property tests. */
export const stochasticMatrix = (k: number): fc.Arbitrary<number[][]> =>
  fc.array(fc.array(fc.integer({ min: 0, max: 1000 }), { minLength: k, maxLength: k }), { minLength: k, maxLength: k })
    .map((rows) => rows.map((row, i) => {
      const w = row.map((x, j) => x + (i === j ? 1 : 0));
      const total = w.reduce((a, b) => a + b, 0);
      return w.map((x) => x / total);
    }));

/** A random probability vector of length k. */
export const mixOf = (k: number): fc.Arbitrary<number[]> =>
  fc.array(fc.integer({ min: 0, max: 1000 }), { minLength: k, maxLength: k })
    .map((w) => { const v = w.map((x, i) => x + (i === 0 ? 1 : 0)); const t = v.reduce((a, b) => a + b, 0); return v.map((x) => x / t); });

export function drawsOf(matrices: number[][][]): MatrixDraws {
  const k = matrices[0]!.length;
  return { k, count: matrices.length, data: Float64Array.from(matrices.flat(2)), source: 'point', notes: [] };
}

/** x P^t with mathjs: the independent reference for the typed-array kernel. */
export function mathjsProjection(x: number[], P: number[][], t: number): number[] {
  let v: Matrix = matrix([x]);
  for (let n = 0; n < t; n++) v = multiply(v, matrix(P)) as Matrix;
  return (v.toArray() as number[][])[0]!;
}

/** A fit with given counts and nothing else, for sampler tests. */
export function fitWithCounts(states: string[], counts: number[][], prior: Fit['prior'] = 'jeffreys',
  impossible: [string, string][] = []): Fit {
  return {
    input: { file: 'test.csv', sha256: '' }, states, step: 1, prior, impossible,
    counts: Float64Array.from(counts.flat()), sites: SiteCountTable.fromList(states.length, []), transitions: counts.flat().reduce((a, b) => a + b, 0),
    skipped: [], repeatedRows: 0, surveys: 0, firstTime: 0,
    latest: { time: 0, counts: states.map(() => 1), shares: states.map(() => 1 / states.length), sites: states.length },
  };
}


/** A scenario over a fit with sensible defaults, for engine tests. */
export function scenarioFor(fit: Fit, overrides: Partial<Scenario> = {}): Scenario {
  return {
    name: 'test', file: 'test.yaml', sha256: '', fit, source: 'posterior', variation: { kind: 'none' }, draws: 500, seed: 1,
    start: { year: 2000, shares: Float64Array.from(fit.latest.shares), from: 'latest' },
    horizonSteps: 10, showSteps: [0, 5, 10], level: 0.9, treatments: [], events: [], ...overrides,
  };
}

/** A treatment acting at full strength on every step of a horizon, unless told otherwise. */
export function treatmentOf(row: number, change: RowChange, horizon: number, extra: Partial<Treatment> = {}): Treatment {
  const weights = new Float64Array(horizon + 1).fill(1);
  weights[0] = 0;
  return { name: 't', row, change, weights, area: 1, parcel: 'p', place: {}, ...extra };
}

/** An event with the same chance every step 1 … horizon. */
export function eventOf(rows: number[][], chance: number, horizon: number, scope: Disturbance['scope'] = 'landscape', name = 'e'): Disturbance {
  const chances = new Float64Array(horizon + 1).fill(chance);
  chances[0] = 0;
  return { name, scope, chances, matrix: Float64Array.from(rows.flat()) };
}

/**
 * Survey histories simulated from a known chain: `sites` sites surveyed every year for `years`
 * years from 2000, each starting in a uniformly random state. States are named a, b, c, ….
 */
export function simulatedSurveys(random: import('../src/uncertainty/random.js').RandomStream, truth: readonly (readonly number[])[],
  sites: number, years: number): import('../src/data/survey.js').SurveyTable & { records: import('../src/data/survey.js').SurveyRecord[] } {
  const k = truth.length;
  const records: import('../src/data/survey.js').SurveyRecord[] = [];
  let line = 2;
  for (let s = 0; s < sites; s++) {
    let state = random.integer(k);
    for (let t = 0; t < years; t++) {
      records.push({ site: `s${String(s).padStart(4, '0')}`, time: 2000 + t, state, line: line++ });
      let u = random.uniform();
      let next = 0;
      while (next < k - 1 && (u -= truth[state]![next]!) >= 0) next += 1;
      state = next;
    }
  }
  // The table as sere reads one, plus its records for tests that pick surveys out by hand.
  const table = tableFromRecords('simulated', Array.from({ length: k }, (_, i) => String.fromCharCode(97 + i)), records);
  return { ...table, records };
}

/** The single-state target `{ state, share }` of a scenario file, resolved. */
export function atLeast(state: number, share: number, staysMet = 1): LandscapeTarget {
  return { states: [state], bound: 'at-least', threshold: share, staysMet };
}

/** The SereError `fn` throws (a test of a refusal asserts its code and place, not its wording). */
export function errorOf(fn: () => unknown): SereError {
  try { fn(); } catch (err) { if (err instanceof SereError) return err; throw err; }
  throw new Error('expected a SereError');
}

/** A fresh temporary folder and a writer of text files into it. */
export function tempFiles(prefix: string): { dir: string; write: (name: string, text: string) => string } {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  return { dir, write: (name, text) => { const file = join(dir, name); writeFileSync(file, text); return file; } };
}

/**
 * Simulation-based calibration's check (Talts et al. 2018): the p-value of Pearson's χ² test that
 * ranks fell evenly into `bins` (counts per equal-width bin of the rank), bins − 1 degrees of freedom.
 */
export function rankUniformityP(bins: readonly number[]): number {
  const total = bins.reduce((a, b) => a + b, 0);
  const expected = total / bins.length;
  return chiSquareUpperTail(bins.reduce((sum, o) => sum + (o - expected) ** 2 / expected, 0), bins.length - 1);
}

/** A start mix carried `steps` years through the k × k matrix at `offset` of `p` (plain loops, for coverage tests). */
export function projectMix(p: ArrayLike<number>, offset: number, start: readonly number[], steps: number): number[] {
  const k = start.length;
  let x = start.slice();
  for (let t = 0; t < steps; t++) {
    const y = new Array<number>(k).fill(0);
    for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) y[j]! += x[i]! * p[offset + i * k + j]!;
    x = y;
  }
  return x;
}

/** Type-7 quantile (Hyndman & Fan 1996) of a small sample (sorting is fine here). */
export function quantile7(values: readonly number[], p: number): number {
  const s = Float64Array.from(values).sort();
  const h = (s.length - 1) * p;
  const i = Math.floor(h);
  return s[i]! + (s[Math.min(i + 1, s.length - 1)]! - s[i]!) * (h - i);
}

/** The same matrix (or matrices, nested rows) for each of D draws, draw-major: draws held at known values. */
export function everyDraw(matrix: readonly (readonly unknown[])[], D: number): Float64Array {
  const one = (matrix.flat(2) as number[]);
  const out = new Float64Array(D * one.length);
  for (let d = 0; d < D; d++) out.set(one, d * one.length);
  return out;
}
