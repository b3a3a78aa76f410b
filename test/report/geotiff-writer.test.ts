import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fromFile } from 'geotiff';
import { StripTiffWriter, projectedGeoKeys, type SampleKind } from '../../src/report/geotiff-writer.js';
import { tempFolder } from '../data/raster/raster-fixtures.js';

const temp = tempFolder('sere-tiff-');
afterAll(() => temp.remove());
const geo = { pixelScale: [10, 10, 0], tiepoint: [0, 0, 0, 300000, 4000000, 0], geoKeys: projectedGeoKeys(32633) };

describe('StripTiffWriter, read back with the geotiff package', () => {
  for (const kind of ['uint8', 'uint16', 'float32'] as SampleKind[]) {
    it(`${kind}: every value, the grid, GeoKeys and nodata, with a short last strip`, async () => {
      const [width, height, rows] = [13, 11, 4];
      const file = join(temp.folder, `${kind}.tif`);
      const w = new StripTiffWriter(file, { width, height, kind, nodata: kind === 'float32' ? -1 : 7, geo, rowsPerStrip: rows });
      const all = kind === 'uint8' ? new Uint8Array(width * height) : kind === 'uint16' ? new Uint16Array(width * height) : new Float32Array(width * height);
      for (let p = 0; p < all.length; p++) all[p] = kind === 'float32' ? p / 1000 : kind === 'uint16' ? p * 301 : p % 256;
      // Rows appended in uneven bands: 3, then 5, then 3.
      for (const [a, b] of [[0, 3], [3, 8], [8, 11]] as const) w.writeRows(all.subarray(a * width, b * width));
      expect(existsSync(file)).toBe(false); // not in place until finished
      w.finish();
      const tiff = await fromFile(file);
      const image = await tiff.getImage();
      expect([image.getWidth(), image.getHeight(), image.getTileHeight(), image.getGDALNoData()]).toEqual([width, height, rows, kind === 'float32' ? -1 : 7]);
      expect(image.getOrigin()).toEqual([300000, 4000000, 0]);
      expect(image.getResolution()).toEqual([10, -10, 0]);
      expect(image.getGeoKeys()).toMatchObject({ GTModelTypeGeoKey: 1, ProjectedCSTypeGeoKey: 32633, ProjLinearUnitsGeoKey: 9001 });
      expect(Array.from((await image.readRasters({ interleave: true })) as unknown as ArrayLike<number>)).toEqual(Array.from(all));
      await tiff.close();
    });
  }

  it('abort leaves nothing behind', () => {
    const w = new StripTiffWriter(join(temp.folder, 'gone.tif'), { width: 4, height: 4, kind: 'uint8', geo, rowsPerStrip: 4 });
    w.writeRows(new Uint8Array(8));
    w.abort();
    expect(readdirSync(temp.folder).filter((f) => f.includes('gone'))).toEqual([]);
  });
});
