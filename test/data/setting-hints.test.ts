import { describe, expect, it } from 'vitest';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { parsePrior } from '../../src/chain/prior.js';
import { errorOf, tempFiles } from '../helpers.js';

const files = tempFiles('sere-hints-');

// The same readers serve the command line and a scenario's fit block, so a hint names both ways of
// giving a setting (what it says is the point of the change, so the wording is asserted here).
describe('hints name the flag and the scenario key', () => {
  it('a missing column: --site-column and fit.columns.site', () => {
    const err = errorOf(() => readSurveyCsv(files.write('a.csv', 'plot,time,state\na,1,x\n'), { columns: DEFAULT_COLUMNS }));
    expect(err.code).toBe('MISSING_COLUMN');
    expect(err.hint).toContain('--site-column (fit.columns.site in a scenario)');
  });
  it('a prior that is not one: --prior and fit.prior', () => {
    const err = errorOf(() => parsePrior('flat', { path: '--prior' }));
    expect(err.code).toBe('BAD_PRIOR');
    expect(err.hint).toContain('--prior (fit.prior in a scenario)');
  });
});
