import { describe, expect, it } from 'vitest';
import type { GapCell } from '../../src/chain/counts.js';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { fitMle } from '../../src/fit/fit.js';
import { zonePooling } from '../../src/fit/zones.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { zoneRowDraws } from '../../src/uncertainty/zone-draws.js';

const k = 3;
const mask = Uint8Array.from([0, 0, 0, 1, 0, 1, 0, 0, 0]);
const prior = Float64Array.from(mask, (m) => (m ? 0 : 0.5));
const zones = [Float64Array.from([5, 3, 1, 0, 4, 0, 2, 1, 6]), Float64Array.from([9, 1, 0, 0, 7, 0, 1, 3, 2]), Float64Array.from([2, 2, 2, 0, 3, 0, 0, 0, 4])];

describe('partial pooling with gapped records (data augmentation)', () => {
  it('with one-step pairs only, no gaps and empty gaps give the same draws (pinned)', () => {
    // Re-pinned when the sampler became four chains (zone-posterior.ts: value-breaking, CHANGELOG);
    // same fixture, seed 77, 1,500 draws.
    for (const gaps of [undefined, [[], [], []]]) {
      const out = zoneRowDraws(zones, mask, prior, k, 1500, randomStreams(77), gaps);
      let sumsq = 0;
      for (const x of out.data) sumsq += x * x;
      expect(sumsq).toBe(8923.7080734096);
      expect(out.data[0]).toBe(0.5556702338730646);
      expect(out.data[(2 * 1500 + 1499) * 9 + 8]).toBe(0.6761631344518306);
      expect(out.kappa[0]![999]).toBe(223.88558406900876);
      expect(out.kappa[2]![1499]).toBe(110.14322838675184);
      expect(out.kappa[1]).toBeNull();
    }
  });

  it('a zone seen only two steps apart learns its row from its bridges', () => {
    // Row 0 of zone 1 has no one-step pair at all: 400 sites surveyed two steps apart from state 0.
    // Its true row is (0.5, 0.3, 0.2) with states 1 and 2 kept in place (the mask below), so after
    // two steps 0 → (0.25, 0.45, 0.30); the other zone's row is (0.8, 0.1, 0.1), seen one step apart.
    const absorbing = Uint8Array.from([0, 0, 0, 1, 0, 1, 1, 1, 0]);
    const alpha = Float64Array.from(absorbing, (m) => (m ? 0 : 0.5));
    const counts = [Float64Array.from([320, 40, 40, 0, 5, 0, 0, 0, 5]), Float64Array.from([0, 0, 0, 0, 5, 0, 0, 0, 5])];
    const gaps: GapCell[][] = [[], [[0, 0, 2, 100], [0, 1, 2, 180], [0, 2, 2, 120]]];
    const out = zoneRowDraws(counts, absorbing, alpha, k, 2000, randomStreams(5), gaps);
    const mean = (z: number, j: number): number => {
      let s = 0;
      for (let d = 0; d < 2000; d++) s += out.data[(z * 2000 + d) * 9 + j]!;
      return s / 2000;
    };
    // Posterior sd of zone 1's cells is about 0.03 here (400 two-step sites); 0.06 is two of them.
    expect(Math.abs(mean(1, 0) - 0.5)).toBeLessThan(0.06);
    expect(Math.abs(mean(1, 1) - 0.3)).toBeLessThan(0.06);
    expect(Math.abs(mean(0, 0) - 0.8)).toBeLessThan(0.04);
    // Same seed, same draws.
    expect(zoneRowDraws(counts, absorbing, alpha, k, 2000, randomStreams(5), gaps).data).toEqual(out.data);
  });

  it('the point estimate starts from each zone\'s own EM fit: a zone row is w·shared + (1 − w)·own to 10⁻⁸ (expected counts below 10⁻⁶ are taken as 0) (the zoned demo, which has gaps)', () => {
    const s = loadScenario('scenarios/brenhollow/zoned.yaml');
    const zs = s.fit.zones!.zones;
    expect(zs.some((z) => (z.fit.gapCounts?.length ?? 0) > 0)).toBe(true);
    const p = zonePooling(s.fit);
    const K = s.fit.states.length;
    zs.forEach((zone, z) => {
      const own = fitMle(zone.fit).p;
      for (let i = 0; i < K; i++) {
        const w = p.pull[z]![i]!;
        if (w === 1) continue; // κ̂ = ∞: the shared row whole
        for (let j = 0; j < K; j++) {
          expect(Math.abs(p.rows[z]![i * K + j]! - (w * p.shared[i * K + j]! + (1 - w) * own[i * K + j]!))).toBeLessThan(1e-8);
        }
      }
    });
  });
});
