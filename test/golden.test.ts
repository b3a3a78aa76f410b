import { describe, expect, it } from 'vitest';
import { loadScenarios } from '../src/scenario/load-scenario.js';
import { runForecast } from '../src/engine/forecast.js';
import { randomStreams } from '../src/uncertainty/random.js';

/**
 * Pinned seeded outputs, one per code path (posterior; site bootstrap with given shares; landscape
 * events with plot counts; a partial-area treatment). Managers rerun old scenarios: if a change
 * moves these numbers, it is a value-breaking change — update them in the same commit and say so in
 * CHANGELOG.md. Values recorded with 500 draws after the switch to named random streams (0.5.0).
 */
const golden: Record<string, { medians: string[]; dominance: number; plots?: number[]; holds?: number; treated?: string[] }> = {
  'no-action': { medians: ['0.065930074028', '0.064167579643', '0.191844710781', '0.233600368909', '0.415355251626'], dominance: 0.06 },
  'new-cell': { medians: ['0.059779076638', '0.052563730593', '0.183573250495', '0.248104497979', '0.445100973659'], dominance: 0.868 },
  'storm-surges': { medians: ['0.087051860344', '0.077344083547', '0.189109398180', '0.239952723995', '0.373591551741'], dominance: 0.052, plots: [5, 5, 11, 15, 22] },
  'sow-pioneer': { medians: ['0.070768376788', '0.069342994505', '0.202732820727', '0.248053707013', '0.384211109293'], dominance: 0.066 },
  // A cap that must stay met 5 years, met at the start; a half-area treatment lasting to the horizon (recorded 0.5.0).
  'cap-rank-grass': { medians: ['0.085428696979', '0.078980721014', '0.232949952073', '0.349532129722', '0.232626835540'], dominance: 1, holds: 0.748,
    treated: ['0.078728026266', '0.074332795838', '0.221712234645', '0.332475062929', '0.262078035222'] },
};

describe('seeded outputs of the demo scenarios (value stability)', () => {
  for (const [name, want] of Object.entries(golden)) {
    it(`${name}: horizon medians, target chance${want.plots ? ', plot counts' : ''}${want.treated ? ', treated long-run mix' : ''}`, () => {
      const s = loadScenarios(`scenarios/brenhollow/${name}.yaml`)[0]!;
      const r = runForecast({ ...s, draws: 500 }, randomStreams(s.seed!));
      const last = r.years.length - 1;
      expect(r.shares.map((b) => b.median[last]!.toFixed(12))).toEqual(want.medians);
      expect(r.dominance!.probability).toBe(want.dominance);
      if (want.plots) expect(r.plots!.map((b) => b.median[last])).toEqual(want.plots);
      if (want.holds !== undefined) expect(r.dominance!.holdsAtHorizon).toBe(want.holds);
      if (want.treated) expect(r.treatedStationary!.bands!.map((b) => b.median.toFixed(12))).toEqual(want.treated);
    });
  }
});
