import { describe, expect, it } from 'vitest';
import { rankUniformityP } from '../helpers.js';
import { multinomialSampler } from '../../src/uncertainty/multinomial.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { VARIATION_SAMPLES } from '../../src/uncertainty/variation.js';
import { zoneRowDraws } from '../../src/uncertainty/zone-draws.js';
import { BINS, binRank, K as k, L, MASK as mask, PICKS as picks, PRIOR as prior, sharedRow, zoneRow } from './zone-sbc-records.js';

/**
 * Simulation-based calibration of partial pooling (Talts, Betancourt, Simpson, Vehtari & Gelman
 * 2018, arXiv:1804.06788): draw the shared (κ, p) of a row from the stated prior (κ log-logistic
 * with scale 50, p ~ Dirichlet(0.5, 0.5, 0.5)), each of four zones' rows from Dirichlet(κp), 15
 * transitions per zone, then run zone-draws.ts as a forecast does and rank the truth among L = 19
 * of its draws, 50 sweeps apart (nearly independent, as the method asks). Checked for κ and for one
 * cell of zone 0's row — the zone row's posterior Dirichlet(κp + n) within each draw of (κ, p).
 * 300 records, ranks 0 … 19 in 10 bins, χ² against uniform with 9 degrees of freedom, each rejected
 * at p < 0.001: a correct sampler fails one of the two checks about 2 times in 1,000 (the seed is
 * fixed, so the test repeats). Rows 1 and 2 have one possible cell, so only row 0 is sampled.
 */
describe('simulation-based calibration of partial pooling', () => {
  it('ranks of the true κ and of a zone row\'s cell among the forecast\'s draws are uniform (300 records, χ² p > 0.001)', () => {
    const random = randomStreams(2013);
    const RECORDS = 300;
    const Z = 4;
    const N = 15;
    const kappaBins = new Array<number>(BINS).fill(0);
    const cellBins = new Array<number>(BINS).fill(0);
    expect(picks[L - 1]! < VARIATION_SAMPLES).toBe(true);
    for (let r = 0; r < RECORDS; r++) {
      const rep = random.stream(`record:${r}`);
      const { kappa, p } = sharedRow(rep);
      const multinomial = multinomialSampler(rep.stream('data'));
      const theta = new Float64Array(3);
      const drawn = new Int32Array(3);
      let truth = 0;
      const zones = Array.from({ length: Z }, (_, z) => {
        zoneRow(rep, kappa, p, theta);
        if (z === 0) truth = theta[0]!;
        drawn.fill(0); // the sampler adds to its output
        multinomial(N, theta, 0, 3, drawn, 0);
        return Float64Array.from([drawn[0]!, drawn[1]!, drawn[2]!, 0, 2, 0, 0, 0, 2]);
      });
      const out = zoneRowDraws(zones, mask, prior, k, VARIATION_SAMPLES, rep.stream('sampler'));
      let kappaRank = 0;
      let cellRank = 0;
      for (const d of picks) {
        if (out.kappa[0]![d]! < kappa) kappaRank += 1;
        if (out.data[d * k * k]! < truth) cellRank += 1;
      }
      binRank(kappaBins, kappaRank);
      binRank(cellBins, cellRank);
    }
    const pKappa = rankUniformityP(kappaBins);
    const pCell = rankUniformityP(cellBins);
    console.log('zones SBC κ bins', kappaBins.join(' '), 'p =', pKappa.toFixed(3), '· θ₀ bins', cellBins.join(' '), 'p =', pCell.toFixed(3));
    expect(pKappa).toBeGreaterThan(0.001);
    expect(pCell).toBeGreaterThan(0.001);
  }, 900_000); // 164 s wall at load 13–15 with the sampler's four chains (2026-12-03; κ p = 0.902, θ₀ p = 0.494), past the default 60 s
});
