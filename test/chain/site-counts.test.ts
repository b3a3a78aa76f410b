import { describe, expect, it } from 'vitest';
import { SiteCountTable } from '../../src/chain/site-counts.js';

describe('per-site counts in typed arrays', () => {
  const list = [
    { site: 'A', group: 'clay', cells: [[0, 0, 2], [1, 0, 1]] as [number, number, number][] },
    { site: 'B', group: 'sand', cells: [] as [number, number, number][] },
    { site: 'C', group: 'clay', cells: [[1, 1, 4]] as [number, number, number][] },
  ];

  it('gives back the fit file\'s list exactly, empty sites included', () => {
    const table = SiteCountTable.fromList(2, list);
    expect(table.length).toBe(3);
    expect(JSON.parse(JSON.stringify(table))).toEqual(list);
    const ungrouped = list.map(({ site, cells }) => ({ site, cells }));
    expect(SiteCountTable.fromList(2, ungrouped).toJSON()).toEqual(ungrouped);
  });

  it('adds one site, weighted, into a dense table', () => {
    const table = SiteCountTable.fromList(2, list);
    const dense = new Float64Array(4);
    table.addTo(dense, 0, 2);
    table.addTo(dense, 1);
    table.addTo(dense, 2);
    expect(Array.from(dense)).toEqual([4, 0, 2, 4]);
  });
});
