import { describe, expect, it } from 'vitest';
import { errorSurveyEffort, EFFORT_SAMPLER } from '../../src/evaluation/survey-effort-errors.js';
import { DEFAULT_AUGMENT } from '../../src/uncertainty/augment.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { errorScenario, truePaths } from '../evaluation/error-effort-fixture.js';

/**
 * Effort reruns the observer-error sampler with short settings (EFFORT_SAMPLER: 2 chains × 100 +
 * 100) instead of a fit's (DEFAULT_AUGMENT: 4 chains × 500 + 2 × 250). Checked against the full
 * rerun on a small invented case with a noisy error table (75% recorded right, where the sampler
 * mixes slowest): the same seed, so the same truths, surveys and band draws; only the sampler's
 * length differs. A short warm-up that had not reached the posterior would show as a shift of
 * every width one way.
 */
const NOISY = [[0.75, 0.25, 0], [0.12, 0.76, 0.12], [0, 0.25, 0.75]];

describe('effort with an error table: the short rerun against the full one', () => {
  it('gives the same widths within Monte Carlo error', () => {
    const scenario = errorScenario(truePaths(1, 40, 4), NOISY, { seed: 2 });
    const grid = { sites: [10, 40], seasons: [3] };
    const run = (sampler: typeof EFFORT_SAMPLER) => errorSurveyEffort(scenario, grid, { replicates: 20, draws: 300, random: randomStreams(12), sampler });
    const short = run(EFFORT_SAMPLER);
    const full = run(DEFAULT_AUGMENT);
    const rows = [[short.current, full.current], ...short.cells.map((c, i) => [c.widths, full.cells[i]!.widths])];
    const gaps = rows.map(([a, b]) => Math.max(...a!.map((x, s) => Math.abs(x - b![s]!) / b![s]!)));
    const signed = rows.flatMap(([a, b]) => a!.map((x, s) => (x - b![s]!) / b![s]!));
    console.log(`short against full rerun: largest relative gap per row (now, 10, 40 sites) ${gaps.map((g) => g.toFixed(3)).join(' ')}; ` +
      `mean signed ${(signed.reduce((x, y) => x + y, 0) / signed.length).toFixed(3)}`);
    // The band of each replicate is a 300-draw quantile estimate of a width near 0.3 (its own Monte
    // Carlo error a few %), averaged over 20 replicates; 8% per state, 4% on the mean signed gap.
    gaps.forEach((g) => expect(g).toBeLessThan(0.08));
    expect(Math.abs(signed.reduce((x, y) => x + y, 0) / signed.length)).toBeLessThan(0.04);
  }, 900_000);
});
