import { describe, expect, it } from 'vitest';
import { loadScenarios } from '../../src/scenario/load-scenario.js';
import { errorOf, tempFiles } from '../helpers.js';

const files = tempFiles('sere-block-size-');
// Invented: 36 sites on a 10 m grid, two surveys each.
const rows = ['plot,year,cover,east,north'];
for (let c = 0; c < 36; c++) for (const year of [2020, 2021]) rows.push(`p${c},${year},${(c + year) % 3 === 0 ? 'open' : 'shrub'},${10 * (c % 6)},${10 * Math.floor(c / 6)}`);
files.write('plots.csv', rows.join('\n') + '\n');
const scenario = (uncertainty: string, columns = 'site: plot, time: year, state: cover, x: east, y: north'): string =>
  files.write('s.yaml', `data: plots.csv\nfit:\n  columns: { ${columns} }\nuncertainty: ${uncertainty}\nhorizon: { years: 5 }\n`);

describe('uncertainty.block_size', () => {
  it('sets the side of the blocks, reported with how it was chosen', () => {
    const [s] = loadScenarios(scenario('{ source: bootstrap, block_size: 20 }'));
    expect(s!.fit.spatial).toEqual({ side: 20, chosenBy: 'given', blocks: 9 });
  });

  it('refuses a side that is not positive, or larger than the extent, at the key', () => {
    const zero = errorOf(() => loadScenarios(scenario('{ source: bootstrap, block_size: 0 }')));
    expect([zero.code, zero.place.path, zero.place.line]).toEqual(['BAD_SCENARIO', 'uncertainty.block_size', 4]);
    const wide = errorOf(() => loadScenarios(scenario('{ source: bootstrap, block_size: 51 }')));
    expect([wide.code, wide.place.path, wide.place.line]).toEqual(['BAD_OPTION', 'uncertainty.block_size', 4]);
  });

  it('refuses a side for sites without positions, and one coordinate column alone', () => {
    const none = errorOf(() => loadScenarios(scenario('{ source: bootstrap, block_size: 20 }', 'site: plot, time: year, state: cover')));
    expect([none.code, none.place.path]).toEqual(['BAD_OPTION', 'uncertainty.block_size']);
    const half = errorOf(() => loadScenarios(scenario('{ source: bootstrap }', 'site: plot, time: year, state: cover, x: east')));
    expect([half.code, half.place.path]).toEqual(['BAD_OPTION', 'fit.columns']);
  });
});
