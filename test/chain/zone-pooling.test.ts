import { describe, expect, it } from 'vitest';
import { partialPoolingMle, zoneRows } from '../../src/chain/zone-pooling.js';
import { dirichletMultinomialLogPmf } from '../../src/chain/dirichlet-multinomial.js';

const k = 3;
const none = new Uint8Array(k * k);
const fallback = new Float64Array(k * k).fill(1 / 3);

/** Σ_z log DM(n_z | κp) over row i's zones: the likelihood partial pooling maximises. */
function logLik(zones: Float64Array[], i: number, kappa: number, p: ArrayLike<number>): number {
  return zones.reduce((s, n) => s + dirichletMultinomialLogPmf(n.subarray(i * k, i * k + k), Array.from(p, (x) => x * kappa)), 0);
}

describe('partial pooling of zones (point estimate)', () => {
  it('zones whose rows agree exactly give κ = ∞ and the pooled maximum-likelihood rows', () => {
    // Both zones' row 0 in proportion 6:3:1, the second with twice the counts.
    const a = Float64Array.from([6, 3, 1, 0, 5, 5, 2, 2, 6]);
    const b = Float64Array.from([12, 6, 2, 0, 10, 10, 4, 4, 12]);
    const p = partialPoolingMle([a, b], none, k, fallback);
    expect(p.kappa[0]).toBe(Infinity);
    // Pooled row 0: (18, 9, 3)/30 — what the pooled fit's closed form gives.
    for (const rows of p.rows) expect(Array.from(rows.subarray(0, 3))).toEqual([0.6, 0.3, 0.1].map((x) => expect.closeTo(x, 12)));
    expect(p.pull[0]![0]).toBe(1);
    // Row 1 (0 → 1): the only cells kept are 1 and 2 across both zones.
    expect(p.kappa[1]).toBe(Infinity);
  });

  it('zones that differ get a finite κ, at the maximum of the Dirichlet–multinomial likelihood, and rows between own and shared', () => {
    const zones = [Float64Array.from([40, 8, 2, 1, 1, 1, 1, 1, 1]), Float64Array.from([10, 30, 10, 1, 1, 1, 1, 1, 1]),
      Float64Array.from([20, 15, 15, 1, 1, 1, 1, 1, 1])];
    const p = partialPoolingMle(zones, none, k, fallback);
    const kappa = p.kappa[0]!;
    expect(Number.isFinite(kappa)).toBe(true);
    const shared = p.shared.subarray(0, 3);
    const best = logLik(zones, 0, kappa, shared);
    // A maximum in κ: 10% either way lowers the likelihood.
    expect(best).toBeGreaterThan(logLik(zones, 0, kappa * 1.1, shared));
    expect(best).toBeGreaterThan(logLik(zones, 0, kappa / 1.1, shared));
    zones.forEach((n, z) => {
      const N = n[0]! + n[1]! + n[2]!;
      const w = kappa / (kappa + N);
      expect(p.pull[z]![0]).toBeCloseTo(w, 14);
      // (κp + n)/(κ + N), the posterior mean row given (κ, p) (Gelman et al. 2013, BDA3 ch. 5).
      for (let j = 0; j < 3; j++) expect(p.rows[z]![j]).toBeCloseTo((kappa * shared[j]! + n[j]!) / (kappa + N), 12);
    });
  });

  it('a state no zone left takes the fallback row; zones are handed over as periods of the variation model', () => {
    const a = Float64Array.from([0, 0, 0, 1, 2, 0, 0, 0, 3]);
    const b = Float64Array.from([0, 0, 0, 2, 1, 0, 0, 0, 3]);
    const fb = Float64Array.from([0.2, 0.5, 0.3, 0, 0, 0, 0, 0, 0]);
    const p = partialPoolingMle([a, b], none, k, fb);
    expect(Array.from(p.rows[0]!.subarray(0, 3))).toEqual([0.2, 0.5, 0.3]);
    const r = zoneRows([a, b], none, k)[1]!;
    expect(r.times).toEqual([0, 1]);
    expect(Array.from(r.counts)).toEqual([1, 2, 0, 2, 1, 0]);
  });
});
