import { mkdtempSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readLabelMap, type LabelMap } from '../../src/data/label-map.js';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { readSurveyTables } from '../../src/data/read-survey-tables.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { errorOf, tempFiles } from '../helpers.js';

const { dir, write } = tempFiles('sere-labels-');

// Invented field records: two spellings of bracken, a class code for woodland, a code to leave out.
const recorded = write('recorded.csv', [
  'site,time,state',
  'A,1,Bracken', 'A,2,bracken', 'A,3,41', 'A,4,41',
  'B,1,heath', 'B,2,Bracken', 'B,3,99', 'B,4,heath',
  'C,1,99', 'C,2,99',
  'D,1,041', 'D,2,heath',
].join('\n') + '\n');
// The same surveys as they should have been written: 99 dropped, 041 is not 41.
const clean = write('clean.csv', [
  'site,time,state',
  'A,1,bracken', 'A,2,bracken', 'A,3,woodland', 'A,4,woodland',
  'B,1,heath', 'B,2,bracken', 'B,4,heath',
  'D,1,scrub', 'D,2,heath',
].join('\n') + '\n');
const mapText = '"Bracken": bracken\n41: woodland\n"041": scrub\n99: skip\nheath: heath\n';

describe('label maps: recorded label or class code → state', () => {
  const map = write('labels.yaml', mapText);

  it('maps labels and class codes, drops the surveys mapped to skip, and fits as the clean table does', () => {
    const table = readSurveyCsv(recorded, { columns: DEFAULT_COLUMNS, labels: readLabelMap(map) });
    const reference = readSurveyCsv(clean, { columns: DEFAULT_COLUMNS });
    expect(table.states).toEqual(['bracken', 'heath', 'scrub', 'woodland']);
    expect(table.labels).toMatchObject({ file: map, droppedRows: 3 });
    // C's every survey was skipped: it is no site.
    expect(table.sites).toEqual(['A', 'B', 'D']);
    const a = fitSurvey(table, DEFAULT_FIT_SETTINGS);
    const b = fitSurvey(reference, DEFAULT_FIT_SETTINGS);
    expect(Array.from(a.counts)).toEqual(Array.from(b.counts));
    expect(a.latest).toEqual(b.latest);
    expect(a.skipped).toEqual(b.skipped);
    expect(a.labels?.droppedRows).toBe(3);
  });

  it('looks each distinct label up once, however many rows hold it', () => {
    const base = readLabelMap(map);
    let lookups = 0;
    const targets = new Map(base.targets);
    const counting: LabelMap = { ...base, targets: Object.assign(targets, { get: (k: string) => { lookups += 1; return Map.prototype.get.call(targets, k) as string | null | undefined; } }) };
    const rows = ['site,time,state'];
    for (let s = 0; s < 500; s++) for (let t = 1; t <= 4; t++) rows.push(`S${s},${t},${['Bracken', '41', 'heath', '99'][(s + t) % 4]}`);
    const table = readSurveyCsv(write('many.csv', rows.join('\n') + '\n'), { columns: DEFAULT_COLUMNS, labels: counting });
    expect(lookups).toBe(4);
    expect(table.labels?.droppedRows).toBe(500);
    expect(table.rows.count).toBe(1500);
  });

  it('lists every unmapped label with its first line, pointing at the first', () => {
    const partial = readLabelMap(write('partial.yaml', '"Bracken": bracken\n'));
    const err = errorOf(() => readSurveyCsv(recorded, { columns: DEFAULT_COLUMNS, labels: partial }));
    expect(err).toMatchObject({ code: 'UNMAPPED_LABEL', place: { file: recorded, line: 4, column: 3 } });
    // 41, heath, 99 and 041: four labels, each named once.
    for (const label of ["'41' (line 4)", "'heath' (line 6)", "'99' (line 8)", "'041' (line 12)"]) expect(err.message).toContain(label);
  });

  it('passes a label spelled as a declared state without an entry of its own', () => {
    const partial = readLabelMap(write('no-heath.yaml', '"Bracken": bracken\n41: woodland\n"041": scrub\n99: skip\n'));
    expect(errorOf(() => readSurveyCsv(recorded, { columns: DEFAULT_COLUMNS, labels: partial })).code).toBe('UNMAPPED_LABEL');
    const table = readSurveyCsv(recorded, { columns: DEFAULT_COLUMNS, labels: partial, states: ['heath', 'bracken', 'scrub', 'woodland'] });
    expect(table.states).toEqual(['heath', 'bracken', 'scrub', 'woodland']);
  });

  it('refuses a state the map gives that is not declared', () => {
    const err = errorOf(() => readSurveyCsv(recorded, { columns: DEFAULT_COLUMNS, labels: readLabelMap(map), states: ['bracken', 'heath', 'woodland'] }));
    // '041' → scrub, on line 3 of the map: the place to fix is the map (or the declared states).
    expect(err).toMatchObject({ code: 'UNKNOWN_STATE', place: { file: map, line: 3 } });
  });

  it('applies to each of several tables read as one, and adds up what it dropped', () => {
    const table = readSurveyTables([recorded, recorded], { columns: DEFAULT_COLUMNS, labels: readLabelMap(map) });
    expect(table.labels?.droppedRows).toBe(6);
  });

  const bad: [string, string, string, number][] = [
    ['a key given twice', 'Bracken: bracken\nheath: heath\nBracken: heath\n', 'DUPLICATE_KEY', 3],
    ['two keys equal after trimming', 'Bracken: bracken\n"Bracken ": heath\n', 'DUPLICATE_KEY', 2],
    ['two keys equal after NFC', '"Caf\u00e9": heath\n"Cafe\u0301": bracken\n', 'DUPLICATE_KEY', 2],
    ['a list instead of a map', '- Bracken\n- heath\n', 'BAD_LABEL_MAP', 1],
    ['a label mapped to nothing', 'Bracken:\n', 'BAD_LABEL_MAP', 1],
    ['a nested value', 'Bracken: { a: b }\n', 'BAD_LABEL_MAP', 1],
    ['a state with an invisible character', 'Bracken: "brac\u200bken"\n', 'INVISIBLE_CHARACTER', 1],
    ['bad YAML', 'Bracken: [\n', 'BAD_YAML', 2],
  ];
  for (const [what, text, code, line] of bad) {
    it(`refuses ${what} (${code}, line ${line})`, () => {
      const file = write(`bad-${what.replace(/\W+/g, '-')}.yaml`, text);
      const err = errorOf(() => readLabelMap(file));
      expect(err.code).toBe(code);
      expect(err.place).toMatchObject({ file, line });
    });
  }

  it('is named by a scenario relative to the scenario file (fit.labels)', () => {
    const sub = mkdtempSync(join(dir, 'scenario-'));
    writeFileSync(join(sub, 'surveys.csv'), 'site,2001,2002,2003\nA,Bracken,41,41\nB,heath,Bracken,99\n');
    writeFileSync(join(sub, 'map.yaml'), mapText);
    writeFileSync(join(sub, 's.yaml'), 'data: surveys.csv\nfit: { labels: map.yaml, layout: wide }\nhorizon: { steps: 2 }\n');
    const scenario = loadScenario(join(sub, 's.yaml'));
    // A: bracken → woodland → woodland; B: heath → bracken, then a survey left out (99).
    expect(scenario.fit.states).toEqual(['bracken', 'heath', 'woodland']);
    expect(Array.from(scenario.fit.counts)).toEqual([0, 0, 1, 1, 0, 0, 0, 0, 1]);
    expect(scenario.fit.labels?.droppedRows).toBe(1);
    writeFileSync(join(sub, 'missing.yaml'), 'data: surveys.csv\nfit: { labels: nowhere.yaml }\nhorizon: { steps: 2 }\n');
    expect(errorOf(() => loadScenario(join(sub, 'missing.yaml')))).toMatchObject({ code: 'FILE_NOT_FOUND', place: { path: 'fit.labels' } });
  });
});
