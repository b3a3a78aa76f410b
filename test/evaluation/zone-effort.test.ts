import { describe, expect, it } from 'vitest';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { zoneSurveyEffort } from '../../src/evaluation/zone-effort.js';
import { randomStreams } from '../../src/uncertainty/random.js';

describe('sere effort by zone (a stratified scenario)', () => {
  it('splits sites by area, equals "now" with no sites, and narrows every zone and the landscape with many', () => {
    const scenario = loadScenario('scenarios/brenhollow/zoned.yaml');
    const run = (): ReturnType<typeof zoneSurveyEffort> =>
      zoneSurveyEffort(scenario, { sites: [0, 30, 600], seasons: [5] }, { replicates: 2, draws: 200, random: randomStreams(11) });
    const effort = run();
    expect(effort.names).toEqual(['creekside', 'landward', 'midmarsh']);
    expect(effort.shares).toEqual([120 / 425, 95 / 425, 210 / 425]);
    const [none, thirty, many] = effort.cells;
    // Quotas 8.47, 6.71, 14.82 → floors 8, 6, 14 and the two units left to the largest remainders (midmarsh, landward).
    expect(thirty!.zones.map((z) => z.sites)).toEqual([8, 7, 15]);
    expect(many!.zones.map((z) => z.sites)).toEqual([169, 134, 297]);
    // No sites: the same draws and bands as now, exactly (common random numbers).
    expect(none!.widths).toEqual(effort.current);
    none!.zones.forEach((z, n) => expect(z.widths).toEqual(effort.currentZones[n]));
    // 600 sites for 5 seasons add about 10 times each zone's transitions. The landscape's band narrows
    // in every state (measured 0.34–0.43 of now at this seed; √11 would give 0.30); a zone's rare
    // states gain few transitions from resurveying its plots (landward mudflat 0.76 of now), so
    // each zone is checked on its widths summed over states (measured 0.39–0.51 of now).
    effort.current.forEach((w, s) => expect(many!.widths[s]!).toBeLessThan(0.6 * w));
    const sum = (w: readonly number[]): number => w.reduce((a, b) => a + b, 0);
    effort.currentZones.forEach((now, z) => expect(sum(many!.zones[z]!.widths)).toBeLessThan(0.65 * sum(now)));
    // The landscape's band is narrower than the widest zone's: its zones' chances partly offset.
    const high = scenario.fit.states.indexOf('high-marsh');
    expect(effort.current[high]!).toBeLessThan(Math.max(...effort.currentZones.map((w) => w[high]!)));
  });
});
