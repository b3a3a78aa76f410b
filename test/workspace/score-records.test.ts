import { tableFromRecords } from '../../src/data/survey-rows.js';
import { describe, expect, it } from 'vitest';
import { scoreRecord } from '../../src/workspace/score-records.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { simulatedSurveys } from '../helpers.js';

describe('scoring an earlier record with its own chain', () => {
  const truth = [[0.8, 0.15, 0.05], [0.1, 0.75, 0.15], [0.05, 0.1, 0.85]];
  const table = simulatedSurveys(randomStreams(7).stream('surveys'), truth, 40, 7); // 2000 … 2006
  const chain = fitSurvey(tableFromRecords(table.file, table.states, table.records.filter((r) => r.time <= 2003)), DEFAULT_FIT_SETTINGS);
  const forecasts = [
    { name: 'plain', start: { year: 2003, from: 'latest' }, treatments: [], events: [] },
    { name: 'with a storm', start: { year: 2003, from: 'latest' }, treatments: [], events: [{}] },
  ];

  it('scores every later survey year from the record\'s latest time, and names the scenarios it stands for', () => {
    const s = scoreRecord({ name: 'r1', chain, forecasts }, table, randomStreams(1))!;
    expect(s.years.map((y) => [y.origin, y.year, y.sites])).toEqual([[2003, 2004, 40], [2003, 2005, 40], [2003, 2006, 40]]);
    expect(s.scenarios).toEqual(['plain']);
    expect(s.summary.sites).toBe(120);
    expect(s.summary.skill.log.climatology!).toBeGreaterThan(0);
  });

  it('redraws the posterior from a stream named after the record: the same name gives the same numbers', () => {
    const a = scoreRecord({ name: 'r1', chain, forecasts }, table, randomStreams(1))!;
    const b = scoreRecord({ name: 'r1', chain, forecasts }, table, randomStreams(1))!;
    const c = scoreRecord({ name: 'r2', chain, forecasts }, table, randomStreams(1))!;
    expect(b.summary).toEqual(a.summary);
    expect(c.summary.chain.log).not.toBe(a.summary.chain.log);
    expect(Math.abs(c.summary.chain.log - a.summary.chain.log)).toBeLessThan(0.02);
  });

  it('a state the record did not know leaves its sites unscored; nothing later gives null', () => {
    const states = [...table.states, 'd'];
    const records = table.records.map((r) => (r.site === 's0000' && r.time === 2005 ? { ...r, state: 3 } : r));
    const s = scoreRecord({ name: 'r1', chain, forecasts }, { states, records }, randomStreams(1))!;
    expect(s.years.map((y) => [y.sites, y.unscored])).toEqual([[40, 0], [39, 1], [40, 0]]);
    expect(scoreRecord({ name: 'r1', chain, forecasts }, { states: table.states, records: table.records.filter((r) => r.time <= 2003) },
      randomStreams(1))).toBeNull();
  });
});
