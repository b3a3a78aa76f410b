import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { lgamma } from 'mathjs';
import { dirichletMultinomialLogPmf, dirichletMultinomialMoments, logRising } from '../../src/chain/dirichlet-multinomial.js';
import { concentrationMle } from '../../src/chain/concentration-mle.js';
import type { RowPeriods } from '../../src/chain/row-periods.js';
import { rowPeriods, informativePeriods } from '../../src/chain/row-periods.js';

// Reference values from SciPy, made by test/reference/dirichlet-multinomial.py (kept beside them).
const reference = JSON.parse(readFileSync(new URL('../reference/dirichlet-multinomial.json', import.meta.url), 'utf8')) as {
  source: string;
  cases: { n: number[]; a: number[]; logpmf: number; mean: number[]; var: number[] }[];
  mle: { periods: number[][]; a: number[]; kappa: number; loglik: number };
};

function periodsOf(rows: readonly (readonly number[])[]): RowPeriods {
  const m = rows[0]!.length;
  return {
    row: 0,
    cells: Int32Array.from({ length: m }, (_, c) => c),
    times: rows.map((_, t) => 2000 + t),
    counts: Float64Array.from(rows.flat()),
    totals: Float64Array.from(rows, (r) => r.reduce((x, y) => x + y, 0)),
  };
}

describe('Dirichlet–multinomial likelihood and moments', () => {
  it('log pmf matches scipy.stats.dirichlet_multinomial.logpmf to 1e-12 (SciPy 1.17.1)', () => {
    for (const c of reference.cases) expect(dirichletMultinomialLogPmf(c.n, c.a)).toBeCloseTo(c.logpmf, 11);
  });

  it('mean and variance match scipy.stats.dirichlet_multinomial.mean/var (SciPy 1.17.1)', () => {
    for (const c of reference.cases) {
      const N = c.n.reduce((x, y) => x + y, 0);
      const { mean, variance } = dirichletMultinomialMoments(N, c.a);
      mean.forEach((x, j) => expect(x).toBeCloseTo(c.mean[j]!, 10));
      variance.forEach((x, j) => expect(x / c.var[j]!).toBeCloseTo(1, 10));
    }
  });

  it('sums to 1 over every outcome (exhaustive, N = 6, three cells)', () => {
    const a = [0.4, 2.5, 1.1];
    let total = 0;
    for (let x = 0; x <= 6; x++) for (let y = 0; x + y <= 6; y++) total += Math.exp(dirichletMultinomialLogPmf([x, y, 6 - x - y], a));
    expect(total).toBeCloseTo(1, 12);
  });

  it('tends to the multinomial as the concentration grows (Mosimann 1962)', () => {
    const p = [0.2, 0.5, 0.3];
    const n = [3, 4, 2];
    const multinomial = Math.log(1260) + 3 * Math.log(0.2) + 4 * Math.log(0.5) + 2 * Math.log(0.3); // 9!/(3!4!2!) = 1260
    expect(dirichletMultinomialLogPmf(n, p.map((x) => x * 1e9))).toBeCloseTo(multinomial, 7);
  });

  it('structural zeros: a zero parameter allows only a zero count', () => {
    expect(dirichletMultinomialLogPmf([2, 0, 1], [1, 0, 2])).toBeCloseTo(dirichletMultinomialLogPmf([2, 1], [1, 2]), 12);
    expect(dirichletMultinomialLogPmf([2, 1, 1], [1, 0, 2])).toBe(-Infinity);
  });

  it('logRising agrees with log Γ(a+n) − log Γ(a) on both of its paths', () => {
    for (const a of [1e-6, 0.3, 2.5, 99, 100, 1e4, 1e9]) {
      for (const n of [1, 5, 8, 9, 40, 300]) {
        let direct = 0;
        for (let m = 0; m < n; m++) direct += Math.log(a + m);
        expect(Math.abs(logRising(a, n) - direct)).toBeLessThan(1e-12 * Math.max(1, Math.abs(direct)));
      }
    }
  });
});

describe('fractional counts (a zone\'s completed counts with gaps hold expected transitions)', () => {
  it('logRising(a, n) for fractional n is log Γ(a+n) − log Γ(a) by mathjs lgamma (mathjs 15.2.0)', () => {
    for (const a of [0.3, 2.5, 99, 150, 1e4]) {
      for (const n of [0.25, 2.5, 7.9, 40.5]) {
        const reference = lgamma(a + n) - lgamma(a);
        expect(Math.abs(logRising(a, n) - reference)).toBeLessThan(1e-9 * Math.max(1, Math.abs(reference)));
      }
    }
  });

  it("Minka's fixed point is continuous in the counts: adding 10⁻⁹ to every count moves κ̂ and p̂ by under 10⁻⁶", () => {
    const { periods } = reference.mle;
    const whole = concentrationMle(periodsOf(periods));
    const nudged = concentrationMle(periodsOf(periods.map((r) => r.map((n) => n + 1e-9))));
    expect(Math.abs(nudged.kappa / whole.kappa - 1)).toBeLessThan(1e-6);
    whole.mean.forEach((p, c) => expect(Math.abs(nudged.mean[c]! - p)).toBeLessThan(1e-6));
  });
});

describe("Minka's fixed point for the concentration", () => {
  it('reaches the maximum scipy.optimize finds on the summed SciPy log pmf (Minka 2000, eq. 55)', () => {
    const { periods, a, kappa, loglik } = reference.mle;
    const mle = concentrationMle(periodsOf(periods));
    expect(mle.kappa / kappa).toBeCloseTo(1, 4);
    mle.mean.forEach((p, c) => expect(p).toBeCloseTo(a[c]! / kappa, 5));
    const ours = periods.reduce((s, n) => s + dirichletMultinomialLogPmf(n, Array.from(mle.mean, (p) => p * mle.kappa)), 0);
    expect(ours).toBeCloseTo(loglik, 8);
  });

  it('reports Infinity when the periods agree no more than multinomial sampling allows', () => {
    // Every period has exactly the same split: less spread than multinomial sampling (under-dispersed).
    const mle = concentrationMle(periodsOf([[10, 10], [10, 10], [10, 10], [10, 10]]));
    expect(mle.kappa).toBe(Infinity);
  });
});

describe('a row’s transitions period by period', () => {
  it('keeps periods with transitions from the row and only its possible cells', () => {
    const mask = Uint8Array.from([0, 0, 1, 0, 0, 0, 0, 0, 0]); // 0>2 impossible
    const r = rowPeriods([
      { time: 2015, cells: [[0, 0, 3], [0, 1, 1], [1, 1, 4]] },
      { time: 2016, cells: [[1, 0, 2]] },
      { time: 2017, cells: [[0, 1, 2]] },
    ], mask, 3, 0);
    expect(Array.from(r.cells)).toEqual([0, 1]);
    expect(r.times).toEqual([2015, 2017]);
    expect(Array.from(r.counts)).toEqual([3, 1, 0, 2]);
    expect(Array.from(r.totals)).toEqual([4, 2]);
    expect(informativePeriods(r)).toBe(2);
  });
});
