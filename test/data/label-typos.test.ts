import { describe, expect, it } from 'vitest';
import { editDistance, likelyTypos } from '../../src/data/label-typos.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import type { SurveyRecord } from '../../src/data/survey.js';

/** 40 sites × 3 surveys cycling through `common`, then `extra` labels on given sites at time 3. */
function table(common: string[], extra: [string, number][]) {
  const states = [...common, ...extra.map(([l]) => l)].filter((s, i, a) => a.indexOf(s) === i).sort();
  const records: SurveyRecord[] = [];
  for (let s = 0; s < 40; s++) for (let t = 0; t < 3; t++) records.push({ site: `p${s}`, time: t, state: states.indexOf(common[(s + t) % common.length]!), line: 0 });
  for (const [label, site] of extra) records.push({ site: `p${site}`, time: 3, state: states.indexOf(label), line: 0 });
  records.forEach((r, n) => { (r as { line: number }).line = n + 2; });
  return tableFromRecords('t.csv', states, records);
}

describe('likely typing slips among state labels', () => {
  it('edit distance: textbook values (kitten → sitting is 3, Levenshtein 1966) and a swap of neighbours counts once', () => {
    expect(editDistance('kitten', 'sitting')).toBe(3);
    expect(editDistance('heather', 'haether')).toBe(1);
    expect(editDistance('heather', 'heather')).toBe(0);
    expect(editDistance('', 'abc')).toBe(3);
  });

  it('flags a rare label one edit from a common one, with its first line, and nothing else', () => {
    const t = table(['heather', 'bracken', 'birch'], [['haether', 5]]);
    const typos = likelyTypos(t);
    expect(typos.map((x) => [x.label, x.near, x.rows])).toEqual([['haether', 'heather', 1]]);
    expect(typos[0]!.line).toBe(122); // header, 120 cycled rows, then the slip
  });

  it('leaves alone real states that differ by one character but are both common, and short labels', () => {
    expect(likelyTypos(table(['stage1', 'stage2', 'stage3'], []))).toEqual([]);
    expect(likelyTypos(table(['bog', 'fen'], [['fon', 1]]))).toEqual([]);
  });
});
