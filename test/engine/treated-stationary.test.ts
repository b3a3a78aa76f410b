import { describe, expect, it } from 'vitest';
import { matrix, pow, type Matrix } from 'mathjs';
import { runForecast } from '../../src/engine/forecast.js';
import { treatedStationary } from '../../src/engine/treated-stationary.js';
import { drawMatrices } from '../../src/uncertainty/draw-matrices.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { changeRow } from '../../src/chain/row-change.js';
import type { RowChange } from '../../src/chain/row-change.js';
import { fitWithCounts, scenarioFor, treatmentOf } from '../helpers.js';

const counts = [[40, 10, 0], [5, 30, 15], [2, 4, 36]];
const fit = fitWithCounts(['bare', 'grass', 'shrub'], counts);
const mle = counts.map((row) => row.map((n) => n / row.reduce((a, b) => a + b, 0)));
const slowShrub: RowChange = { kind: 'multiply', cells: [{ to: 2, value: 0.5 }] };

/** The long-run mix by mathjs matrix powers: any row of P^1000 (the chains here mix within a few dozen steps). */
function longRun(P: number[][]): number[] {
  return ((pow(matrix(P), 1000) as Matrix).toArray() as number[][])[0]!;
}

function treated(P: number[][], row: number, change: RowChange, weight = 1): number[][] {
  const flat = Float64Array.from(P.flat());
  changeRow(flat, row * P.length, P.length, change, weight, new Float64Array(P.length));
  return P.map((_, i) => Array.from(flat.subarray(i * P.length, (i + 1) * P.length)));
}

describe('long-run mix under continued treatment', () => {
  it('whole area: the stationary mix of the treated matrix (point draw, against mathjs powers)', () => {
    const sc = scenarioFor(fit, { source: 'point', draws: 1, treatments: [treatmentOf(1, slowShrub, 10)] });
    const r = runForecast(sc, randomStreams(1));
    const want = longRun(treated(mle, 1, slowShrub));
    expect(r.treatedStationary).toMatchObject({ year: 2010, treatments: [0], unique: 1, notUnique: 0 });
    want.forEach((v, s) => expect(Math.abs(r.treatedStationary!.bands![s]!.median - v)).toBeLessThan(1e-10));
    // Slower grass → shrub: less shrub in the long run than the fitted chain gives.
    expect(r.treatedStationary!.bands![2]!.median).toBeLessThan(r.stationary.bands![2]!.median - 0.05);
  });

  it('partial area: the area-weighted mixture of the treated and untreated land, and where a long forecast ends up', () => {
    const area = 0.3;
    const sc = scenarioFor(fit, { source: 'point', draws: 1, horizonSteps: 1000, showSteps: [0, 1000],
      treatments: [treatmentOf(1, slowShrub, 1000, { area })] });
    const r = runForecast(sc, randomStreams(1));
    const inside = longRun(treated(mle, 1, slowShrub));
    const outside = longRun(mle);
    const want = inside.map((v, s) => area * v + (1 - area) * outside[s]!);
    want.forEach((v, s) => {
      expect(Math.abs(r.treatedStationary!.bands![s]!.median - v)).toBeLessThan(1e-10);
      // The definition is where the engine's own projection settles: sub-populations never exchange land.
      expect(Math.abs(r.shares[s]!.median[1000]! - v)).toBeLessThan(1e-9);
    });
  });

  it('takes the horizon year\'s strength of a ramp, and is null when every treatment has stopped by then', () => {
    const ramp = treatmentOf(1, slowShrub, 10);
    ramp.weights.set([0, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 0.9]);
    const r = runForecast(scenarioFor(fit, { source: 'point', draws: 1, treatments: [ramp] }), randomStreams(1));
    longRun(treated(mle, 1, slowShrub, 0.9)).forEach((v, s) => expect(Math.abs(r.treatedStationary!.bands![s]!.median - v)).toBeLessThan(1e-10));
    const stopped = treatmentOf(1, slowShrub, 10);
    stopped.weights.set([0, 1, 1, 1, 0, 0, 0, 0, 0, 0, 0]);
    expect(runForecast(scenarioFor(fit, { treatments: [stopped] }), randomStreams(1)).treatedStationary).toBeNull();
    expect(runForecast(scenarioFor(fit), randomStreams(1)).treatedStationary).toBeNull();
  });

  it('a treatment that changes nothing gives the fitted chain\'s mix in every posterior draw', () => {
    const none = treatmentOf(0, { kind: 'multiply', cells: [{ to: 1, value: 1 }] }, 10, { area: 0.4 });
    const sc = scenarioFor(fit, { draws: 300, treatments: [none] });
    const r = runForecast(sc, randomStreams(7));
    expect(r.treatedStationary!.unique).toBe(300);
    r.treatedStationary!.bands!.forEach((b, s) => {
      const f = r.stationary.bands![s]!;
      for (const key of ['median', 'low', 'high'] as const) expect(Math.abs(b[key] - f[key])).toBeLessThan(1e-12);
    });
  });

  it('counts draws in which some land has two closed classes instead of averaging them in', () => {
    // Cutting every move out of grass makes it absorbing beside the absorbing shrub: two closed classes.
    const trap = fitWithCounts(['bare', 'grass', 'shrub'], [[10, 5, 5], [0, 10, 10], [0, 0, 10]], 'jeffreys', [['shrub', 'bare'], ['shrub', 'grass'], ['grass', 'bare']]);
    const cut = treatmentOf(1, { kind: 'set', cells: [{ to: 1, value: 1 }] }, 10, { area: 0.5 });
    const sc = scenarioFor(trap, { draws: 100, treatments: [cut] });
    const t = treatedStationary(sc, drawMatrices(trap, 'posterior', 100, randomStreams(2).stream('matrices')))!;
    expect(t).toMatchObject({ unique: 0, notUnique: 100 });
    expect(runForecast(sc, randomStreams(2)).treatedStationary).toMatchObject({ bands: null, unique: 0, notUnique: 100 });
  });
});
