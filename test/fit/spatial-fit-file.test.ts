import { describe, expect, it } from 'vitest';
import type { SurveyRecord } from '../../src/data/survey.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { estimateFit } from '../../src/fit/estimate.js';
import { fitToJson } from '../../src/fit/fit-json.js';
import { loadFit } from '../../src/fit/load-fit.js';
import { bootstrapDraws } from '../../src/uncertainty/bootstrap.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { errorOf, tempFiles } from '../helpers.js';

const files = tempFiles('sere-spatial-fit-');

function placedFit(blockSize?: number) {
  const r = randomStreams(3).stream('sites');
  const records: SurveyRecord[] = [];
  for (let c = 0; c < 64; c++) {
    for (let t = 0; t < 3; t++) records.push({ site: `p${c}`, time: t, state: r.integer(2), line: records.length + 2, x: 100 * (c % 8), y: 50 * Math.floor(c / 8) });
  }
  return fitSurvey(tableFromRecords('p.csv', ['a', 'b'], records), { ...DEFAULT_FIT_SETTINGS, ...(blockSize ? { blockSize } : {}) });
}
const written = (fit: ReturnType<typeof placedFit>) => JSON.parse(JSON.stringify(fitToJson(fit, estimateFit(fit, 0.9)))) as Record<string, unknown>;

describe('fit files with site positions and spatial blocks', () => {
  it('read back to the same blocks and the same bootstrap draws', () => {
    const fit = placedFit(200);
    const file = files.write('fit.json', JSON.stringify(written(fit)));
    const loaded = loadFit(file);
    expect(loaded.spatial).toEqual(fit.spatial);
    expect(Array.from(loaded.positions!)).toEqual(Array.from(fit.positions!));
    const a = bootstrapDraws(fit, 100, randomStreams(8)).data;
    const b = bootstrapDraws(loaded, 100, randomStreams(8)).data;
    expect(Array.from(b)).toEqual(Array.from(a));
  });

  it('keep a chosen side with the range behind it', () => {
    const json = written(placedFit()) as { spatial_blocks: { chosen_by: string; range: { spacing: number } | null } };
    expect(json.spatial_blocks.chosen_by).toBe('range');
    expect(json.spatial_blocks.range!.spacing).toBe(50);
  });

  it('refuse a side that is not positive, a site without a position, and an unknown site', () => {
    const base = written(placedFit(200));
    const cases: [Record<string, unknown>, string][] = [
      [{ ...base, spatial_blocks: { ...(base.spatial_blocks as object), side: 0 } }, 'spatial_blocks.side'],
      [{ ...base, site_positions: (base.site_positions as unknown[]).slice(1) }, 'site_positions'],
      [{ ...base, site_positions: [['nowhere', 0, 0], ...(base.site_positions as unknown[])] }, 'site_positions[0][0]'],
      [{ ...base, spatial_blocks: { ...(base.spatial_blocks as object), side: 5000 } }, 'spatial_blocks.side'],
    ];
    for (const [json, path] of cases) {
      const err = errorOf(() => loadFit(files.write('bad.json', JSON.stringify(json))));
      expect([err.code, err.place.path]).toEqual(['BAD_FIT_FILE', path]);
    }
  });
});
