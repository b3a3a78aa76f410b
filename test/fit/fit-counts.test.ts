import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { readCountsCsv } from '../../src/data/read-counts-csv.js';
import { isCountsFile } from '../../src/data/counts-table.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { tallyCounts } from '../../src/chain/tally-counts.js';
import { countsCsv } from '../../src/data/counts-csv.js';
import { fitSurvey, fitMle, siteCount, type Fit } from '../../src/fit/fit.js';
import { fitCounts } from '../../src/fit/fit-counts.js';
import { groupOf } from '../../src/fit/fit-from-file.js';
import { fitToJson } from '../../src/fit/fit-json.js';
import { fitTable } from '../../src/report/fit-table.js';
import { makeStyle } from '../../src/report/style.js';
import { estimateFit } from '../../src/fit/estimate.js';
import { loadFit } from '../../src/fit/load-fit.js';
import type { FitSettings } from '../../src/fit/settings.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { bootstrapDraws } from '../../src/uncertainty/bootstrap.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { SereError } from '../../src/errors.js';

const dir = mkdtempSync(join(tmpdir(), 'sere-fit-counts-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let files = 0;
function file(text: string, name = `t${files++}.csv`): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

const DEMO = 'scenarios/brenhollow/surveys.csv';
const DEMO_STATES = ['mudflat', 'pioneer', 'low-marsh', 'high-marsh', 'rank-grass'];

/**
 * The demo table with the latest survey removed on every third line (and the last two on every seventh)
 * removed: every demo plot was surveyed in the last year, so nothing would be carried otherwise.
 */
function demoWithUnsurveyed(): string {
  const [header, ...lines] = readFileSync(DEMO, 'utf8').trim().split('\n');
  const latest = Math.max(...lines.map((l) => Number(l.split(',')[1])));
  const kept = lines.filter((l, n) => {
    const back = latest - Number(l.split(',')[1]);
    return !((n % 3 === 0 && back === 0) || (n % 7 === 0 && back <= 1));
  });
  return file([header, ...kept].join('\n') + '\n');
}

function settingsOf(step: number, group?: string, states?: string[]): FitSettings {
  return { step, prior: 'jeffreys', impossible: [], columns: { ...DEFAULT_COLUMNS, group }, ...(states ? { states } : {}) };
}

type Outcome = { fit: Fit } | { code: string };
function attempt(make: () => Fit): Outcome {
  try {
    return { fit: make() };
  } catch (err) {
    if (err instanceof SereError) return { code: err.code };
    throw err;
  }
}

/** The survey table fitted directly, and fitted from its counts table written and read back. */
function bothWays(survey: string, settings: FitSettings, perSite: boolean): [Outcome, Outcome] {
  const direct = attempt(() => fitSurvey(readSurveyCsv(survey, { columns: settings.columns, states: settings.states }), settings));
  let viaCounts: Outcome;
  try {
    const table = readSurveyCsv(survey, { columns: settings.columns, states: settings.states });
    const counts = file(countsCsv(tallyCounts(table, { step: settings.step, perSite })));
    viaCounts = attempt(() => fitCounts(readCountsCsv(counts, { states: settings.states }), settings));
  } catch (err) {
    if (!(err instanceof SereError)) throw err;
    viaCounts = { code: err.code };
  }
  return [direct, viaCounts];
}

/** Everything a fit from counts must share with the survey-table fit. */
function expectSameFit(a: Fit, b: Fit, perSite: boolean): void {
  expect(b.states).toEqual(a.states);
  expect(Array.from(b.counts)).toEqual(Array.from(a.counts));
  expect(b.transitions).toBe(a.transitions);
  expect(b.skipped).toEqual(a.skipped);
  expect(b.gapCounts).toEqual(a.gapCounts);
  expect(b.periods).toEqual(a.periods);
  expect(b.pairsByGap).toEqual(a.pairsByGap);
  // The surveyed mix and, from the last-survey rows, the sites carried into the start.
  expect(b.latest).toEqual(a.latest);
  expect(b.history).toEqual(a.history);
  expect(b.surveys).toBe(a.surveys);
  expect(b.firstTime).toBe(a.firstTime);
  expect(siteCount(b)).toBe(siteCount(a));
  expect(Array.from(fitMle(b).p)).toEqual(Array.from(fitMle(a).p));
  const seed = 20261202;
  expect(Array.from(posteriorDraws(b, 50, randomStreams(seed).stream('p')).data))
    .toEqual(Array.from(posteriorDraws(a, 50, randomStreams(seed).stream('p')).data));
  if (perSite) {
    expect(b.pooledSites).toBeUndefined();
    expect(b.sites.toJSON()).toEqual(a.sites.toJSON());
    expect(Array.from(bootstrapDraws(b, 30, randomStreams(seed).stream('b')).data))
      .toEqual(Array.from(bootstrapDraws(a, 30, randomStreams(seed).stream('b')).data));
  } else {
    expect(b.pooledSites).toBe(a.sites.length);
  }
}

describe('a fit from a counts table equals the survey-table fit', () => {
  for (const perSite of [false, true]) {
    it(`on the demo table (${perSite ? 'with' : 'without'} per-site counts)`, () => {
      const [direct, viaCounts] = bothWays(demoWithUnsurveyed(), settingsOf(1, 'zone', DEMO_STATES), perSite);
      expect('fit' in direct && 'fit' in viaCounts).toBe(true);
      if ('fit' in direct && 'fit' in viaCounts) {
        expectSameFit(direct.fit, viaCounts.fit, perSite);
        // Some demo plots were not surveyed in the last year: the last-survey rows carry them.
        expect(viaCounts.fit.latest.carried!.reduce((n, c) => n + c.sites, 0)).toBeGreaterThan(0);
      }
    });
  }

  it('on the demo table, each group of it (as a scenario\'s fit.group selects one)', () => {
    const settings = settingsOf(1, 'zone', DEMO_STATES);
    const table = readSurveyCsv(DEMO, { columns: settings.columns, states: DEMO_STATES });
    const counts = readCountsCsv(file(countsCsv(tallyCounts(table, { step: 1, perSite: true }))), { states: DEMO_STATES });
    expect(table.groups!.length).toBeGreaterThan(1);
    for (const group of table.groups!) {
      const direct = fitSurvey(groupOf(table, group, 'zone'), { ...settings, group });
      expectSameFit(direct, fitCounts(counts, { ...settings, group }), true);
    }
  });

  it('on random tables: irregular gaps, repeats, groups, steps of 1–3 (property)', () => {
    const table = fc.record({
      step: fc.integer({ min: 1, max: 3 }),
      grouped: fc.boolean(),
      perSite: fc.boolean(),
      rows: fc.array(fc.record({
        site: fc.integer({ min: 0, max: 12 }),
        time: fc.integer({ min: 2000, max: 2012 }),
        state: fc.constantFrom('a', 'b', 'c', 'Dé'),
      }), { minLength: 1, maxLength: 80 }),
      repeat: fc.nat({ max: 3 }),
    });
    fc.assert(fc.property(table, ({ step, grouped, perSite, rows, repeat }) => {
      // One row per (site, time): a contradiction is a survey-table error tested elsewhere.
      const unique = [...new Map(rows.map((r) => [`${r.site} ${r.time}`, r])).values()];
      const lines = ['site,time,state,zone', ...unique.map((r) => `s${r.site},${r.time},${r.state},z${r.site % 3}`)];
      for (let n = 0; n < repeat && n < unique.length; n++) lines.push(lines[1 + n]!);
      const survey = file(lines.join('\n') + '\n');
      const [direct, viaCounts] = bothWays(survey, settingsOf(step, grouped ? 'zone' : undefined), perSite);
      if ('code' in direct) {
        expect(viaCounts).toEqual(direct);
        return;
      }
      expect('fit' in viaCounts).toBe(true);
      if ('fit' in viaCounts) {
        expectSameFit(direct.fit, viaCounts.fit, perSite);
        expect(viaCounts.fit.repeatedRows).toBe(0);
      }
    }), { numRuns: 150, seed: 20261202 });
  });
});

describe('a counts table without last-survey rows (written before they existed)', () => {
  it('still fits, the start then the sites surveyed at the latest time only, and the fit says why', () => {
    const table = readSurveyCsv(demoWithUnsurveyed(), { columns: DEFAULT_COLUMNS, states: DEMO_STATES });
    const csv = countsCsv(tallyCounts(table, { step: 1, perSite: false }));
    // A last-survey row has a from_state and no to_state (the fourth-from-last field empty).
    const old = csv.split('\n').filter((l) => !/^[^,]+,,/.test(l)).join('\n');
    expect(old.length).toBeLessThan(csv.length);
    const oldFit = fitCounts(readCountsCsv(file(old), { states: DEMO_STATES }), settingsOf(1));
    const direct = fitSurvey(table, settingsOf(1));
    expect(oldFit.latest.carried).toBeUndefined();
    expect(oldFit.latest.counts).toEqual(direct.latest.counts);
    const carried = direct.latest.carried!.reduce((n, c) => n + c.sites, 0);
    expect(oldFit.pooledSites! - oldFit.latest.sites).toBe(carried);
    const text = fitTable(oldFit, estimateFit(oldFit, 0.9), makeStyle(false));
    expect(text).toContain(`${carried} sites not surveyed in ${direct.latest.time} left out of the start`);
    const newFit = fitCounts(readCountsCsv(file(csv), { states: DEMO_STATES }), settingsOf(1));
    expect(fitTable(newFit, estimateFit(newFit, 0.9), makeStyle(false))).not.toContain('left out of the start');
  });
});

describe('a fit file from pooled counts', () => {
  it('keeps the number of sites (site_counts null) and reads back; without data.sites it is refused', () => {
    const table = readSurveyCsv(DEMO, { columns: DEFAULT_COLUMNS });
    const fit = fitCounts(readCountsCsv(file(countsCsv(tallyCounts(table, { step: 1, perSite: false })))), settingsOf(1));
    const json = JSON.parse(JSON.stringify(fitToJson(fit, estimateFit(fit, 0.9))));
    expect(json.site_counts).toBeNull();
    expect(json.data.sites).toBe(60);
    const back = loadFit(file(JSON.stringify(json), `f${files++}.json`));
    expect(back.pooledSites).toBe(60);
    expect(Array.from(back.counts)).toEqual(Array.from(fit.counts));
    delete json.data.sites;
    expect(() => loadFit(file(JSON.stringify(json), `f${files++}.json`))).toThrow(expect.objectContaining({ code: 'BAD_FIT_FILE' }));
  });
});

describe('counts tables refused at the door', () => {
  const header = 'from_state,to_state,gap,to_time,step,n';
  const ok = [',a,,2000,1,2', ',b,,2000,1,1', 'a,b,1,2001,1,1', 'b,a,1,2001,1,1', 'a,a,1,2001,1,1'];
  const code = (text: string, settings = settingsOf(1)): string | undefined => {
    try {
      fitCounts(readCountsCsv(file(text)), settings);
      return undefined;
    } catch (err) {
      return (err as SereError).code;
    }
  };
  const place = (text: string): unknown => {
    try {
      readCountsCsv(file(text));
    } catch (err) {
      const { line, column } = (err as SereError).place;
      return { line, column };
    }
    return undefined;
  };

  it('accepts a well-formed table', () => {
    expect(code([header, ...ok].join('\n'))).toBeUndefined();
  });
  it('refuses counts that are not whole and positive, with line and column', () => {
    expect(code([header, ...ok, 'a,b,1,2001,1,1.5'].join('\n'))).toBe('BAD_COUNTS');
    expect(place([header, ...ok, 'a,b,1,2001,1,0'].join('\n'))).toEqual({ line: 7, column: 6 });
  });
  it('refuses a pair 0 steps apart in two states (a contradiction); one in the same state is a repeat, used once', () => {
    expect(code([header, ...ok, 'a,b,0,2001,1,1'].join('\n'))).toBe('DUPLICATE_SURVEY');
    const repeated = readCountsCsv(file([header, ...ok, 'b,b,0,2001,1,2'].join('\n')));
    expect(repeated.repeatedRows).toBe(2);
    expect(fitCounts(repeated, settingsOf(1)).surveys).toBe(6);
  });
  it('reads last-survey rows and refuses them with a gap, per site, or not counting every site once', () => {
    const last = ['a,,,2000,1,1', 'a,,,2001,1,1', 'b,,,2001,1,1'];
    const table = readCountsCsv(file([header, ...ok, ...last].join('\n')));
    expect(fitCounts(table, settingsOf(1)).latest.carried).toEqual([{ state: 0, steps: 1, sites: 1 }]);
    expect(code([header, ...ok, 'a,,1,2000,1,1', ...last.slice(1)].join('\n'))).toBe('BAD_COUNTS');
    expect(code([header, ...ok, ...last.slice(1)].join('\n'))).toBe('BAD_COUNTS');
    expect(place([header, ...ok, ...last.slice(1)].join('\n'))).toEqual({ line: 7, column: undefined });
    expect(code([header, ...ok, ',,,2000,1,1'].join('\n'))).toBe('EMPTY_VALUE');
    const perSite = 'site,from_state,to_state,gap,to_time,step,n';
    expect(code([perSite, ...ok.map((l) => `,${l}`), ...last.map((l) => `,${l}`), 'x,a,,,,1,1'].join('\n'))).toBe('BAD_COUNTS');
  });
  it('refuses a gap on a first survey, and no gap on a pair', () => {
    expect(code([header, ...ok, ',b,1,2001,1,1'].join('\n'))).toBe('BAD_COUNTS');
    expect(code([header, ...ok, 'a,b,,2001,1,1'].join('\n'))).toBe('BAD_COUNTS');
  });
  it('refuses two steps in one table, and fitting with another step', () => {
    expect(code([header, ...ok, 'a,b,1,2002,2,1'].join('\n'))).toBe('BAD_COUNTS');
    expect(code([header, ...ok].join('\n'), settingsOf(2))).toBe('BAD_OPTION');
  });
  it('a counts table without one of its columns is told which, not read as a survey table', () => {
    const noStep = 'from_state,to_state,gap,to_time,n\n,a,,2000,2\na,b,1,2001,1\n';
    expect(isCountsFile(file(noStep))).toBe(true);
    expect(code(noStep)).toBe('MISSING_COLUMN');
    expect(place(noStep)).toEqual({ line: 1, column: undefined });
    try {
      readCountsCsv(file(noStep));
    } catch (err) {
      expect((err as SereError).message).toContain("'step'");
    }
    expect(isCountsFile(file('site,time,state\nx,1,a\n'))).toBe(false);
  });
  it('checks labels as a survey table does', () => {
    expect(code([header, ...ok, 'a,B\u200b,1,2001,1,1'].join('\n'))).toBe('INVISIBLE_CHARACTER');
    expect(code([header, ...ok, 'a,A,1,2001,1,1'].join('\n'))).toBe('STATE_CASE_CLASH');
  });
  it('refuses per-site counts that do not add up to the pooled ones', () => {
    const h = 'site,from_state,to_state,gap,to_time,step,n';
    const pooled = ok.map((r) => `,${r}`);
    const sites = ['s1,,a,,,1,1', 's2,,a,,,1,1', 's3,,b,,,1,1', 's1,a,b,1,,1,1', 's3,b,a,1,,1,1'];
    expect(code([h, ...pooled, ...sites].join('\n'))).toBe('BAD_COUNTS');
    expect(code([h, ...pooled, ...sites, 's2,a,a,1,,1,1'].join('\n'))).toBeUndefined();
  });
});
