import { describe, expect, it } from 'vitest';
import { mean, sqrt, std } from 'mathjs';
import { changeError, meanWidths } from '../../src/evaluation/replicate-widths.js';
import { surveyEffort } from '../../src/evaluation/survey-effort.js';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { randomStreams } from '../../src/uncertainty/random.js';

describe('replicate widths: mean and the Monte Carlo error of a change from "now"', () => {
  it('is the paired differences\' sample standard deviation over √R (mathjs std, the n − 1 form, as reference)', () => {
    const now = [[0.30, 0.10], [0.26, 0.12], [0.33, 0.09], [0.29, 0.11], [0.31, 0.10]];
    const cell = [[0.25, 0.10], [0.22, 0.11], [0.27, 0.09], [0.25, 0.10], [0.24, 0.10]];
    const diffs = (s: number): number[] => cell.map((w, r) => w[s]! - now[r]![s]!);
    const se = changeError(cell, now);
    for (const s of [0, 1]) expect(se[s]!).toBeCloseTo(Number(std(diffs(s))) / Number(sqrt(5)), 14);
    expect(meanWidths(cell)[0]!).toBeCloseTo(mean(cell.map((w) => w[0]!)), 14);
    // One replicate has no spread to measure.
    expect(changeError([[0.2]], [[0.3]])[0]).toBeNaN();
    // Identical differences: no Monte Carlo error at all.
    expect(changeError([[0.2], [0.3]], [[0.3], [0.4]])[0]!).toBeCloseTo(0, 15);
  });

  it('says how far a cell\'s change moves between seeds: the reported error matches the spread over 24 seeds', () => {
    // Calibration by simulation: the change (cell − now) of one cell, estimated with 6 replicates under
    // 24 seeds. Its standard deviation across seeds is what the reported standard error claims; the
    // ratio of the two lies within 0.6–1.6 (a sample standard deviation from 24 values is within
    // ±30% of its own with about 95% chance; the mean of 24 reported errors is steadier).
    const scenario = { ...loadScenario('scenarios/brenhollow/no-action.yaml'), horizonSteps: 20 };
    const t = scenario.target!.states[0]!;
    const changes: number[] = [];
    const errors: number[] = [];
    for (let seed = 1; seed <= 24; seed++) {
      const effort = surveyEffort(scenario, { sites: [60], seasons: [2] }, { replicates: 6, draws: 200, random: randomStreams(seed) });
      const cell = effort.cells[0]!;
      changes.push(cell.widths[t]! - effort.current[t]!);
      errors.push(cell.changeError[t]!);
    }
    const ratio = Number(mean(errors)) / Number(std(changes));
    console.log(`effort change error: mean reported ${Number(mean(errors)).toFixed(4)}, spread over seeds ${Number(std(changes)).toFixed(4)}, ratio ${ratio.toFixed(2)}`);
    expect(ratio).toBeGreaterThan(0.6);
    expect(ratio).toBeLessThan(1.6);
  });
});
