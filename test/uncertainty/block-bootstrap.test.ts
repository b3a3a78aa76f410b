import { describe, expect, it } from 'vitest';
import type { SurveyRecord } from '../../src/data/survey.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import { fitSurvey, withBlockSize } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { blockUnits } from '../../src/fit/spatial-blocks.js';
import { bootstrapDraws, resampleUnits } from '../../src/uncertainty/bootstrap.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { errorOf } from '../helpers.js';

/** 12 × 10 sites on a 1-unit grid, three surveys each, states from a seeded stream; gaps optional. */
function records(gaps = false): SurveyRecord[] {
  const r = randomStreams(5).stream('sites');
  const out: SurveyRecord[] = [];
  for (let y = 0; y < 10; y++) for (let x = 0; x < 12; x++) {
    const site = `s${String(y * 12 + x).padStart(3, '0')}`;
    for (const time of gaps && x % 3 === 0 ? [0, 2, 3] : [0, 1, 2]) out.push({ site, time, state: r.integer(3), line: out.length + 2, x, y });
  }
  return out;
}
const withoutPositions = (rs: SurveyRecord[]): SurveyRecord[] => rs.map(({ x: _x, y: _y, ...rest }) => rest);
const bytes = (a: Float64Array): Buffer => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

describe('spatial block bootstrap', () => {
  it('with blocks of one site draws exactly what the site bootstrap draws (same seed)', () => {
    for (const gaps of [false, true]) {
      const placed = fitSurvey(tableFromRecords('p', ['a', 'b', 'c'], records(gaps)), { ...DEFAULT_FIT_SETTINGS, blockSize: 1 });
      const plain = fitSurvey(tableFromRecords('p', ['a', 'b', 'c'], withoutPositions(records(gaps))), DEFAULT_FIT_SETTINGS);
      expect(placed.spatial).toMatchObject({ side: 1, chosenBy: 'given', blocks: 120 });
      expect(plain.spatial).toBeUndefined();
      const a = bootstrapDraws(placed, 300, randomStreams(2026));
      const b = bootstrapDraws(plain, 300, randomStreams(2026));
      expect(bytes(a.data).equals(bytes(b.data))).toBe(true);
    }
  });

  it('groups sites into square blocks from the lowest corner, numbered by their first site', () => {
    const positions = Float64Array.from([0, 0, 2.5, 0, 0.5, 0.5, 5, 5, 2, 1.9]);
    const units = blockUnits(positions, 2);
    // Blocks (0,0): sites 0, 2; (1,0): 1, 4; (2,2): 3.
    expect(units.count).toBe(3);
    expect(Array.from(units.start)).toEqual([0, 2, 4, 5]);
    expect(Array.from(units.members)).toEqual([0, 2, 1, 4, 3]);
    expect(Array.from(units.sites)).toEqual([2, 2, 1]);
  });

  it('draws whole blocks until a resample has as many sites as the data', () => {
    const fit = withBlockSize(fitSurvey(tableFromRecords('p', ['a', 'b', 'c'], records()), DEFAULT_FIT_SETTINGS), 5, { path: 'uncertainty.block_size' });
    const units = resampleUnits(fit);
    expect(units.count).toBe(3 * 2);
    expect(fit.spatial).toMatchObject({ side: 5, chosenBy: 'given', blocks: 6 });
    const draws = bootstrapDraws(fit, 50, randomStreams(9));
    expect(draws.notes.some((n) => n.includes('blocks of side 5') && n.includes('6 blocks'))).toBe(true);
    expect(draws.notes.some((n) => n.includes('below 20'))).toBe(true);
  });

  it('refuses a block size for a fit without positions', () => {
    const plain = fitSurvey(tableFromRecords('p', ['a', 'b', 'c'], withoutPositions(records())), DEFAULT_FIT_SETTINGS);
    const err = errorOf(() => withBlockSize(plain, 3, { path: 'uncertainty.block_size' }));
    expect([err.code, err.place.path]).toEqual(['BAD_OPTION', 'uncertainty.block_size']);
  });
});
