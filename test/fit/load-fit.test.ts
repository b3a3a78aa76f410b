import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadFit } from '../../src/fit/load-fit.js';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { estimateFit } from '../../src/fit/estimate.js';
import { fitToJson } from '../../src/fit/fit-json.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { writeFileAtomic } from '../../src/cli/write-file.js';
import { errorOf } from '../helpers.js';


describe('fit files', () => {
  it('round-trip: a written fit loads back with the same counts, sites and latest mix', () => {
    const settings = { ...DEFAULT_FIT_SETTINGS, impossible: [['c', 'a']] as [string, string][] };
    const fit = fitSurvey(readSurveyCsv('test/fixtures/hand.csv', { columns: DEFAULT_COLUMNS }), settings);
    const file = join(mkdtempSync(join(tmpdir(), 'sere-')), 'fit.json');
    writeFileAtomic(file, JSON.stringify(fitToJson(fit, estimateFit(fit, 0.9))), false);
    const back = loadFit(file);
    expect(Array.from(back.counts)).toEqual(Array.from(fit.counts));
    expect(back.sites).toEqual(fit.sites);
    expect(back.latest).toEqual(fit.latest);
    expect(back.impossible).toEqual([['c', 'a']]);
    expect(back).toMatchObject({ states: fit.states, step: 1, prior: 'jeffreys', transitions: 8, surveys: 10, firstTime: 1 });
  });

  it('rejects a file of another format, pointing at the key', () => {
    const err = errorOf(() => loadFit('test/fixtures/fits/not-a-fit.json'));
    expect(err.code).toBe('BAD_FIT_FILE');
    expect(err.place).toMatchObject({ line: 2, path: 'format' });
  });

  it('rejects per-site counts that do not add up to the pooled counts', () => {
    const err = errorOf(() => loadFit('test/fixtures/fits/inconsistent.json'));
    expect(err.code).toBe('BAD_FIT_FILE');
    expect(err.message).toContain('do not add up');
    expect(err.place).toMatchObject({ line: 12, path: 'site_counts' });
  });
});
