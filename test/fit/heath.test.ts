import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { fitMle, fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { heathSurveys, STATES } from '../../scripts/heath-fixture.js';

const FILE = 'test/fixtures/heath/surveys.csv';

describe('the invented Quillanmoor heath (scripts/heath-fixture.ts): plots added later, every other year, missed visits', () => {
  it('is the generator output, byte for byte', () => {
    expect(readFileSync(FILE, 'utf8')).toBe(heathSurveys());
  });

  it('loses no pair: every pair of consecutive surveys is used, whatever its gap', () => {
    const table = readSurveyCsv(FILE, { columns: DEFAULT_COLUMNS, states: [...STATES] });
    const fit = fitSurvey(table, { ...DEFAULT_FIT_SETTINGS, states: [...STATES], impossible: [['mature-heath', 'bare-peat']] });
    const pairs = fit.pairsByGap!.reduce((s, p) => s + p.pairs, 0);
    expect(pairs).toBe(fit.surveys - fit.sites.length);
    expect(fit.skipped).toEqual([]);
    expect(fit.singleSurveySites).toBe(0);
    // The every-other-year plots give most of the 2-step pairs; missed visits the longer ones.
    expect(fit.pairsByGap!.map((p) => p.gap)).toEqual([1, 2, 3, 5]);
    expect(fit.pairsByGap![1]!.pairs).toBeGreaterThan(200);
    const mle = fitMle(fit);
    expect(mle.converged).toBe(true);
    expect(mle.p[2 * 5 + 0]).toBe(0);
  });
});
