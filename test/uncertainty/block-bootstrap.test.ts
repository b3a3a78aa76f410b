import { describe, expect, it } from 'vitest';
import type { SurveyRecord } from '../../src/data/survey.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import { fitMle, fitSurvey, withBlockSize } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { blockUnits, edgeCorrection } from '../../src/fit/spatial-blocks.js';
import { edgeLag } from '../../src/fit/spatial-range.js';
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

describe('the block bootstrap\'s edge correction', () => {
  it('the mean edge distance of a correlogram: near 2σ/√π for a Gaussian one, and cut at the first ρ ≤ 0', () => {
    const sigma = 1.5;
    const lags = Array.from({ length: 40 }, (_, c) => c + 1);
    const gaussian = { spacing: 1, lags, correlation: lags.map((h) => Math.exp(-(h * h) / (4 * sigma * sigma))) };
    // Continuous value 2σ/√π = 1.693 (∫r²ρ / ∫rρ · 2/π); the lattice's own lag 0 (the 1 in the denominator) takes it to 1.63.
    expect(Math.abs(edgeLag(gaussian) - (2 * sigma) / Math.sqrt(Math.PI))).toBeLessThan(0.1);
    // Hand-computed: 4(1²·0.5 + 2²·0.2) / (1 + 2π(1·0.5 + 2·0.2)) = 5.2 / 6.6549 (spacing 2 doubles it); the 0.3 after −0.01 is noise, left out.
    expect(edgeLag({ spacing: 2, lags: [2, 4, 6, 8], correlation: [0.5, 0.2, -0.01, 0.3] })).toBeCloseTo(2 * 5.2 / (1 + 2 * Math.PI * 0.9), 12);
  });

  it('scales each draw\'s departure from the MLE by 1/(1 − m/side) (floored at ¼ of the variance kept); a given side is not corrected', () => {
    const blocks = { side: 10, chosenBy: 'range' as const, blocks: 9, range: { range: 5, reached: true, spacing: 1, sites: 100, edgeLag: 2 } };
    expect(edgeCorrection(blocks)).toBeCloseTo(1.25, 14);
    expect(edgeCorrection({ ...blocks, side: 2.5 })).toBe(2);
    expect(edgeCorrection({ side: 10, chosenBy: 'given', blocks: 9 })).toBe(1);
    const { edgeLag: _, ...oldRange } = blocks.range;
    expect(edgeCorrection({ ...blocks, range: oldRange })).toBe(1);

    const fit = fitSurvey(tableFromRecords('p', ['a', 'b', 'c'], records()), { ...DEFAULT_FIT_SETTINGS, blockSize: 3 });
    const corrected = { ...fit, spatial: { ...fit.spatial!, chosenBy: 'range' as const, range: { range: 1.5, reached: true, spacing: 1, sites: 120, edgeLag: 0.6 } } };
    const a = bootstrapDraws(fit, 200, randomStreams(8));
    const b = bootstrapDraws(corrected, 200, randomStreams(8));
    const full = fitMle(fit).p;
    const factor = 1 / (1 - 0.6 / 3);
    let clamped = 0;
    for (let d = 0; d < 200; d++) for (let i = 0; i < 3; i++) {
      const row = Array.from({ length: 3 }, (_, j) => full[i * 3 + j]! + factor * (a.data[d * 9 + i * 3 + j]! - full[i * 3 + j]!));
      if (row.some((x) => x < 0)) { clamped += 1; continue; }
      for (let j = 0; j < 3; j++) expect(Math.abs(b.data[d * 9 + i * 3 + j]! - row[j]!)).toBeLessThan(1e-12);
    }
    expect(clamped).toBeLessThan(30);
  });
});
