import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { heathSurveysWithErrors, STATES } from '../../scripts/heath-fixture.js';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import { type ErrorEstimate } from '../../src/chain/error-em.js';
import { fitMle, fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { estimateFit } from '../../src/fit/estimate.js';
import { fitToJson } from '../../src/fit/fit-json.js';
import { loadFit } from '../../src/fit/load-fit.js';
import { sampleLatent } from '../../src/uncertainty/augment.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { fitCounts } from '../../src/fit/fit-counts.js';
import { readCountsCsv } from '../../src/data/read-counts-csv.js';
import { errorOf, tempFiles } from '../helpers.js';

const SURVEYS = 'test/fixtures/heath/surveys-observed.csv';
const ACCURACY = 'test/fixtures/heath/accuracy.csv';
const SETTINGS = { ...DEFAULT_FIT_SETTINGS, states: [...STATES], impossible: [['mature-heath', 'bare-peat']] as [string, string][], errors: ACCURACY };
const SMALL = { chains: 2, warmUp: 60, retained: 80, thin: 1 };
const { dir, write } = tempFiles('sere-error-fit-');

describe('the heath fixture with one observer who records young heath as grassland (scripts/heath-fixture.ts)', () => {
  it('is the generator output, byte for byte', () => {
    const { surveys, assessment } = heathSurveysWithErrors();
    expect(readFileSync(SURVEYS, 'utf8')).toBe(surveys);
    expect(readFileSync(ACCURACY, 'utf8')).toBe(assessment);
  });

  it('fits with --errors, losing no pair, and its error matrix puts young heath recorded as grassland near the assessment', () => {
    const table = readSurveyCsv(SURVEYS, { columns: DEFAULT_COLUMNS, states: [...STATES] });
    const fit = fitSurvey(table, SETTINGS);
    expect(fit.pairsByGap!.reduce((s, p) => s + p.pairs, 0)).toBe(fit.surveys - fit.sites.length);
    expect(fit.skipped).toEqual([]);
    const mle = fitMle(fit) as ErrorEstimate;
    expect(mle.converged).toBe(true);
    const k = STATES.length;
    const yh = STATES.indexOf('young-heath');
    const gr = STATES.indexOf('grassland');
    // The assessment alone says 3 of 60; the records add their own evidence, so not exactly 0.05.
    expect(mle.emission[yh * k + gr]).toBeGreaterThan(0.01);
    expect(mle.emission[yh * k + gr]).toBeLessThan(0.1);
    // Cells the assessment never saw stay impossible; the declared zero of P stays zero.
    expect(mle.emission[STATES.indexOf('bracken') * k + gr]).toBe(0);
    expect(mle.p[STATES.indexOf('mature-heath') * k + STATES.indexOf('bare-peat')]).toBe(0);
  });

  it('writes a fit file that reads back to the same posterior draws and starts', () => {
    const table = readSurveyCsv(SURVEYS, { columns: DEFAULT_COLUMNS, states: [...STATES] });
    const unsampled = fitSurvey(table, SETTINGS);
    const fit = { ...unsampled, latentSample: sampleLatent(unsampled, SMALL, randomStreams(11).stream('augment')) };
    const file = join(dir, 'fit.json');
    const json = fitToJson(fit, estimateFit(fit, 0.9)) as { error_model: { true_transitions: number }; estimation: { method: string } };
    expect(json.estimation.method).toBe('em-observer-error');
    writeFileSync(file, JSON.stringify(json));
    const loaded = loadFit(file);
    const a = posteriorDraws(fit, 50, randomStreams(3).stream('p'));
    const b = posteriorDraws(loaded, 50, randomStreams(3).stream('p'));
    expect(Array.from(b.data)).toEqual(Array.from(a.data));
    expect(Array.from(b.starts!)).toEqual(Array.from(a.starts!));
    // Every sweep holds every transition of the true paths, and the latest true mix covers every carried site.
    const k = STATES.length;
    for (let r = 0; r < SMALL.retained; r++) {
      expect(fit.latentSample.latent.subarray(r * k * k, (r + 1) * k * k).reduce((x, y) => x + y, 0)).toBe(json.error_model.true_transitions);
      expect(fit.latentSample.errors!.latest.subarray(r * k, (r + 1) * k).reduce((x, y) => x + y, 0)).toBe(150);
    }
    expect(fitMle(loaded).p).toEqual(fitMle(fit).p);
  });

  it('pins its seeded sweeps and draws (value stability: a change here is value-breaking)', () => {
    const table = readSurveyCsv(SURVEYS, { columns: DEFAULT_COLUMNS, states: [...STATES] });
    const unsampled = fitSurvey(table, SETTINGS);
    const sample = sampleLatent(unsampled, SMALL, randomStreams(11).stream('augment'));
    // Re-pinned when binomials moved to inversion and BTPE (binomial.ts): record patterns shared by
    // several sites draw their paths through multinomials (error-sampler.ts), so the sweeps moved.
    expect(Array.from(sample.latent.subarray(0, 25))).toEqual([87, 32, 1, 15, 11, 6, 183, 80, 9, 5, 0, 15, 351, 15, 24, 2, 36, 7, 303, 18, 5, 6, 5, 15, 219]);
    expect(Array.from(sample.errors!.emissions.subarray(79 * 25 + 5, 79 * 25 + 10))).toEqual([0, 0.9669687942811669, 0, 0.033031205718833195, 0]);
    expect(Array.from(sample.errors!.latest.subarray(79 * 5, 80 * 5))).toEqual([4, 18, 54, 36, 38]);
    const draws = posteriorDraws({ ...unsampled, latentSample: sample }, 3, randomStreams(3).stream('p'));
    expect(Array.from(draws.data.subarray(0, 5))).toEqual([0.6733958747401585, 0.17213249547019357, 0.00019568196662910357, 0.10034465025626761, 0.053931297566751295]);
    expect(Array.from(draws.starts!.subarray(0, 5))).toEqual([4 / 150, 19 / 150, 53 / 150, 37 / 150, 37 / 150]);
  });

  it('refuses a fit file whose error matrix breaks a structural zero', () => {
    const table = readSurveyCsv(SURVEYS, { columns: DEFAULT_COLUMNS, states: [...STATES] });
    const unsampled = fitSurvey(table, SETTINGS);
    const fit = { ...unsampled, latentSample: sampleLatent(unsampled, SMALL, randomStreams(11).stream('augment')) };
    const json = fitToJson(fit, estimateFit(fit, 0.9)) as { error_model: { probabilities: number[][] } };
    json.error_model.probabilities[0] = [0.9, 0.1, 0, 0, 0];
    const file = write('broken.json', JSON.stringify(json));
    const err = errorOf(() => loadFit(file));
    expect(err.code).toBe('BAD_FIT_FILE');
    expect(err.place.path).toContain('error_model');
  });
});

describe('impossible transitions with and without an error model', () => {
  const states = ['a', 'b', 'c'];
  // Site x is recorded a → c, declared impossible; every state verified, and c sometimes recorded for a true b.
  const table = tableFromRecords('t.csv', states, [
    { site: 'w', time: 1, state: 0, line: 2 }, { site: 'w', time: 2, state: 1, line: 3 }, { site: 'w', time: 3, state: 2, line: 4 },
    { site: 'x', time: 1, state: 0, line: 5 }, { site: 'x', time: 2, state: 2, line: 6 },
  ]);
  const settings = { ...DEFAULT_FIT_SETTINGS, impossible: [['a', 'c']] as [string, string][] };

  it('without one: IMPOSSIBLE_OBSERVED at the line, as before', () => {
    const err = errorOf(() => fitSurvey(table, settings));
    expect(err.code).toBe('IMPOSSIBLE_OBSERVED');
    expect(err.place.line).toBe(6);
  });

  it('with one that allows a true b recorded as c: the record is evidence of mislabelling, and fits', () => {
    const errors = write('bc.csv', 'recorded,verified,n\na,a,10\nb,b,9\nc,b,1\nc,c,10\n');
    const fit = fitSurvey(table, { ...settings, errors });
    expect(fit.errorModel).toBeDefined();
    expect(fitMle(fit).p[0 * 3 + 2]).toBe(0);
  });

  it('with one that never records anything but c as c: IMPOSSIBLE_RECORD at the survey no true path explains', () => {
    const errors = write('exact.csv', 'recorded,verified,n\na,a,10\nb,b,10\nc,c,10\n');
    const err = errorOf(() => fitSurvey(table, { ...settings, errors }));
    expect(err.code).toBe('IMPOSSIBLE_RECORD');
    expect(err.place).toEqual({ file: 't.csv', line: 6 });
  });

  it('an error matrix needs each site\'s records: refused for a counts table, naming the flag', () => {
    const counts = write('c.csv', 'from_state,to_state,gap,to_time,step,n\n,a,,1,1,1\na,b,1,2,1,1\n');
    const err = errorOf(() => fitCounts(readCountsCsv(counts), { ...DEFAULT_FIT_SETTINGS, errors: 'e.csv' }));
    expect(err.code).toBe('BAD_OPTION');
    expect(err.place.path).toBe('--errors');
  });
});
