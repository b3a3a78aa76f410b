/**
 * One 4,000 × 4,000 Float32 map written two ways, for the measured reason beside
 * src/report/geotiff-writer.ts (run by `npm run bench -- raster`, each way in its own process so
 * peak RSS is its own):
 *
 *   node dist/scripts/bench/raster-writer.js package OUT.tif   — the geotiff package's writeArrayBuffer
 *   node dist/scripts/bench/raster-writer.js strips OUT.tif    — StripTiffWriter, 256 rows at a time
 */
import { writeFileSync } from 'node:fs';
import { writeArrayBuffer } from 'geotiff';
import { StripTiffWriter, projectedGeoKeys } from '../../src/report/geotiff-writer.js';

const SIZE = 4000;
const [mode, out] = process.argv.slice(2);
const value = (x: number, y: number): number => ((x * 7 + y * 13) % 1000) / 1000;
if (mode === 'package') {
  const values = new Float32Array(SIZE * SIZE);
  for (let y = 0; y < SIZE; y++) for (let x = 0; x < SIZE; x++) values[y * SIZE + x] = value(x, y);
  const buffer = writeArrayBuffer(values, {
    width: SIZE, height: SIZE, BitsPerSample: [32], SampleFormat: [3],
    ModelPixelScale: [30, 30, 0], ModelTiepoint: [0, 0, 0, 500000, 6000000, 0],
    GTModelTypeGeoKey: 1, GTRasterTypeGeoKey: 1, ProjectedCSTypeGeoKey: 32631,
  } as never);
  writeFileSync(out!, Buffer.from(buffer));
} else if (mode === 'strips') {
  const rows = 256;
  const w = new StripTiffWriter(out!, { width: SIZE, height: SIZE, kind: 'float32', geo: { pixelScale: [30, 30, 0], tiepoint: [0, 0, 0, 500000, 6000000, 0], geoKeys: projectedGeoKeys(32631) }, rowsPerStrip: rows });
  const band = new Float32Array(rows * SIZE);
  for (let y0 = 0; y0 < SIZE; y0 += rows) {
    const n = Math.min(rows, SIZE - y0);
    for (let r = 0; r < n; r++) for (let x = 0; x < SIZE; x++) band[r * SIZE + x] = value(x, y0 + r);
    w.writeRows(band.subarray(0, n * SIZE));
  }
  w.finish();
} else {
  console.error('usage: raster-writer.js package|strips OUT.tif');
  process.exit(2);
}
