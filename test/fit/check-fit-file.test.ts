import { mkdtempSync, writeFileSync } from 'node:fs';
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
import { tableFromRecords } from '../../src/data/survey-rows.js';
import { augment } from '../../src/uncertainty/augment.js';
import { bootstrapDraws } from '../../src/uncertainty/bootstrap.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { errorOf } from '../helpers.js';


type Json = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

/**
 * A fit file as `sere fit --out` writes it: the hand-counted table (states a, b, c; counts
 * [[1,2,0],[1,1,1],[0,1,1]]; c>a impossible), or the grouped one (group column 'soil').
 */
function goodFit(grouped = false): Json {
  const columns = grouped ? { site: 'site', time: 'time', state: 'state', group: 'soil' } : DEFAULT_COLUMNS;
  const table = readSurveyCsv(grouped ? 'test/fixtures/grouped.csv' : 'test/fixtures/hand.csv', { columns });
  const fit = fitSurvey(table, { ...DEFAULT_FIT_SETTINGS, columns, impossible: grouped ? [] : [['c', 'a']] });
  return JSON.parse(JSON.stringify(fitToJson(fit, estimateFit(fit, 0.9)))) as Json;
}

function write(json: Json): string {
  const file = join(mkdtempSync(join(tmpdir(), 'sere-fit-')), 'fit.json');
  writeFileSync(file, JSON.stringify(json, null, 2));
  return file;
}

/** Each case edits a good fit file one way and names the key path the error must point at. */
const cases: [string, (f: Json) => void, string][] = [
  // Seen in the wild: 18 sites counted for 1 made forecast start at 1800 % and exit 0.
  ['latest counts disagree with the site count', (f) => { f.latest.counts = [0, 0, 18]; }, 'latest.sites'],
  ['latest counts one short', (f) => { f.latest.counts[0] += 1; }, 'latest.sites'],
  ['a state listed twice', (f) => { f.states[1] = f.states[0]; }, 'states[1]'],
  ['a state listed twice after NFC', (f) => { f.states = ['caf\u00e9', 'cafe\u0301', ...f.states.slice(2)]; }, 'states[1]'],
  ['a state with a zero-width space', (f) => { f.states[0] = `${f.states[0]}\u200b`; }, 'states[0]'],
  ['101 states', (f) => { f.states = Array.from({ length: 101 }, (_, n) => `s${n}`); }, 'states'],
  ['a counts row too short', (f) => { f.counts[1].pop(); }, 'counts[1]'],
  ['a fractional count', (f) => { f.counts[0][0] += 0.5; }, 'counts[0][0]'],
  ['a negative count', (f) => { f.counts[0][0] = -1; }, 'counts[0][0]'],
  ['a count beyond 2^53', (f) => { f.counts[0][0] = 2 ** 60; }, 'counts[0][0]'],
  ['no transitions at all', (f) => {
    f.counts = f.counts.map((r: number[]) => r.map(() => 0));
    f.site_counts = []; f.period_counts = []; f.order2_counts = [];
  }, 'counts'],
  ['site counts not adding up to counts', (f) => { f.site_counts[0].cells[0][2] += 1; }, 'site_counts'],
  ['a site index out of range', (f) => { f.site_counts[0].cells[0][1] = 3; }, 'site_counts[0].cells[0]'],
  ['a site listed twice', (f) => { f.site_counts[1].site = f.site_counts[0].site; }, 'site_counts[1].site'],
  ['a site id with a bidi override', (f) => { f.site_counts[0].site = '\u202eA'; }, 'site_counts[0].site'],
  ['a site with a group but no group column', (f) => { f.site_counts[0].group = 'clay'; }, 'site_counts[0].group'],
  ['an impossible pair naming an unknown state', (f) => { f.impossible = [['a', 'nowhere']]; }, 'impossible[0][1]'],
  ['an impossible pair listed twice', (f) => { f.impossible = [['a', 'c'], ['a', 'c']]; }, 'impossible[1]'],
  ['an impossible pair that was observed', (f) => { f.impossible = [['a', 'b']]; }, 'counts[0][1]'],
  ['every transition out of a state impossible', (f) => {
    // A fourth state, never seen, that could go nowhere.
    f.states.push('d');
    f.counts = [...f.counts.map((r: number[]) => [...r, 0]), [0, 0, 0, 0]];
    f.latest.counts.push(0);
    f.impossible = [['d', 'a'], ['d', 'b'], ['d', 'c'], ['d', 'd']];
  }, 'impossible'],
  ['the jeffreys prior with pseudo-count 3', (f) => { f.prior.pseudo_count = 3; }, 'prior.pseudo_count'],
  ['an unknown prior name', (f) => { f.prior.name = 'flat'; }, 'prior.name'],
  ['a time beyond 2^53', (f) => { f.latest.time = 2 ** 53 + 2; }, 'latest.time'],
  ['a step longer than the surveys span', (f) => { f.step = 1000; }, 'step'],
  ['first time after the latest', (f) => { f.data.first_time = f.latest.time + 1; }, 'data.first_time'],
  ['period counts not adding up to counts', (f) => { f.period_counts[0].cells[0][2] += 1; }, 'period_counts'],
  ['a period outside the surveys', (f) => { f.period_counts[0].time = f.latest.time; }, 'period_counts[0].time'],
  ['more runs of three than transitions', (f) => { f.order2_counts[0][3] += 100; }, 'order2_counts'],
  ['an order-2 index out of range', (f) => { f.order2_counts[0][2] = 7; }, 'order2_counts[0]'],
  ['a gap count of one step', (f) => { f.data.gap_counts = [[0, 1, 1, 2]]; }, 'data.gap_counts[0][2]'],
  ['a gap count listed as 0', (f) => { f.data.gap_counts = [[0, 1, 2, 0]]; }, 'data.gap_counts[0][3]'],
  ['a gap index out of range', (f) => { f.data.gap_counts = [[0, 3, 2, 1]]; }, 'data.gap_counts[0]'],
  ['gap counts out of order', (f) => { f.data.gap_counts = [[0, 1, 3, 1], [0, 1, 2, 1]]; }, 'data.gap_counts[1]'],
];

describe('fit files edited by hand', () => {
  it('the unedited files load (so every failure below is the edit)', () => {
    expect(loadFit(write(goodFit())).transitions).toBe(8);
    expect(loadFit(write(goodFit(true))).groupColumn).toBe('soil');
  });

  it('a fit of the whole demo table, with its group column, passes every check', () => {
    const columns = { ...DEFAULT_COLUMNS, group: 'zone' };
    const fit = fitSurvey(readSurveyCsv('scenarios/brenhollow/surveys.csv', { columns }),
      { ...DEFAULT_FIT_SETTINGS, columns, impossible: [['mudflat', 'high-marsh'], ['rank-grass', 'mudflat']] });
    const back = loadFit(write(JSON.parse(JSON.stringify(fitToJson(fit, estimateFit(fit, 0.9)))) as Json));
    expect(back.sites).toEqual(fit.sites);
    expect(Array.from(back.counts)).toEqual(Array.from(fit.counts));
  });

  it('pairs two or more whole steps apart are counted by gap and survive the round trip', () => {
    // Site A surveyed at 0, 2, 3, 7: pairs 0→2 (gap 2), 2→3 (one step), 3→7 (gap 4); site B at 0, 3 (gap 3).
    const rows: [string, number, number][] = [['A', 0, 0], ['A', 2, 1], ['A', 3, 1], ['A', 7, 0], ['B', 0, 1], ['B', 3, 0]];
    const table = tableFromRecords('gaps.csv', ['a', 'b'], rows.map(([site, time, state], n) => ({ site, time, state, line: n + 2 })));
    const fit = fitSurvey(table, DEFAULT_FIT_SETTINGS);
    expect(fit.gapCounts).toEqual([[0, 1, 2, 1], [1, 0, 3, 1], [1, 0, 4, 1]]);
    const back = loadFit(write(JSON.parse(JSON.stringify(fitToJson(fit, estimateFit(fit, 0.9)))) as Json));
    expect(back.gapCounts).toEqual(fit.gapCounts);
  });

  describe('a fit with gaps, sampled at fit time', () => {
    const rows: [string, number, number][] = [['A', 0, 0], ['A', 2, 1], ['A', 3, 1], ['A', 7, 0], ['B', 0, 1], ['B', 3, 0], ['C', 0, 0], ['C', 1, 0], ['C', 2, 1]];
    const table = tableFromRecords('gaps.csv', ['a', 'b'], rows.map(([site, time, state], n) => ({ site, time, state, line: n + 2 })));
    const plain = fitSurvey(table, DEFAULT_FIT_SETTINGS);
    const fit = { ...plain, latentSample: augment(plain, { chains: 2, warmUp: 20, retained: 40, thin: 1 }, randomStreams(9).stream('augment')) };
    const json = (): Json => JSON.parse(JSON.stringify(fitToJson(fit, estimateFit(fit, 0.9)))) as Json;

    it('keeps its sampler sweeps and per-site gaps through the file, and draws the same posterior from it', () => {
      const back = loadFit(write(json()));
      expect(Array.from(back.latentSample!.latent)).toEqual(Array.from(fit.latentSample.latent));
      expect(back.latentSample!.seed).toBe(9);
      expect(back.siteGaps).toEqual(plain.siteGaps);
      expect(Array.from(posteriorDraws(back, 50, randomStreams(3)).data)).toEqual(Array.from(posteriorDraws(fit, 50, randomStreams(3)).data));
      expect(Array.from(bootstrapDraws(back, 20, randomStreams(3)).data)).toEqual(Array.from(bootstrapDraws(plain, 20, randomStreams(3)).data));
    });

    const edits: [string, (f: Json) => void, string][] = [
      ['a sweep with a transition too many', (f) => { f.posterior_sampler.latent_counts[3][0] += 1; }, 'posterior_sampler.latent_counts[3]'],
      ['fewer sweeps than retained', (f) => { f.posterior_sampler.latent_counts.pop(); }, 'posterior_sampler.latent_counts'],
      ['site gaps that do not add up', (f) => { f.site_gap_counts[0][4] += 1; }, 'site_gap_counts'],
      ['a site gap on an unknown site', (f) => { f.site_gap_counts[0][0] = 'Z'; }, 'site_gap_counts[0][0]'],
      ['a sampler on a fit without gaps', (f) => { f.data.gap_counts = []; f.data.pairs_by_gap = [f.data.pairs_by_gap[0]]; f.site_gap_counts = []; }, 'posterior_sampler'],
    ];
    for (const [what, edit, path] of edits) {
      it(`${what} → BAD_FIT_FILE at ${path}`, () => {
        const f = json();
        edit(f);
        const err = errorOf(() => loadFit(write(f)));
        expect(err.code).toBe('BAD_FIT_FILE');
        expect(err.place.path).toBe(path);
      });
    }
  });

  it('a site without its group, when the fit has a group column → BAD_FIT_FILE at that site', () => {
    const json = goodFit(true);
    delete json.site_counts[1].group;
    expect(errorOf(() => loadFit(write(json))).place.path).toBe('site_counts[1]');
  });

  for (const [what, edit, path] of cases) {
    it(`${what} → BAD_FIT_FILE at ${path}`, () => {
      const json = goodFit();
      edit(json);
      const file = write(json);
      const err = errorOf(() => loadFit(file));
      expect(err.code).toBe('BAD_FIT_FILE');
      expect(err.place.path).toBe(path);
      expect(err.place.file).toBe(file);
      expect(err.place.line).toBeGreaterThan(0);
    });
  }

  it('points at the exact line of latest.sites', () => {
    const json = goodFit();
    json.latest.counts = [0, 0, 18];
    const file = write(json);
    const line = JSON.stringify(json, null, 2).split('\n').findIndex((l) => l.includes('"sites": 1')) + 1;
    expect(errorOf(() => loadFit(file)).place.line).toBe(line);
  });

  it('states in NFD load as NFC, and impossible pairs match them', () => {
    const json = goodFit();
    json.states[0] = 'cafe\u0301';
    json.impossible = [[json.states[2], 'caf\u00e9']];
    const fit = loadFit(write(json));
    expect(fit.states[0]).toBe('caf\u00e9');
    expect(fit.impossible).toEqual([[fit.states[2], 'caf\u00e9']]);
  });

  it('a reordered site list loads in the canonical order', () => {
    const json = goodFit();
    const sites = loadFit(write(json)).sites;
    json.site_counts.reverse();
    expect(loadFit(write(json)).sites).toEqual(sites);
  });
});
