import { closeSync, openSync, renameSync, rmSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { SereError } from '../errors.js';

/** The georeferencing of a grid as GeoTIFF holds it, copied verbatim from an input raster. */
export interface GeoTags {
  /** ModelPixelScaleTag (33550): x, y, z size of a pixel. */
  readonly pixelScale?: readonly number[];
  /** ModelTiepointTag (33922): raster point and model point, 6 numbers per tie point. */
  readonly tiepoint?: readonly number[];
  /** ModelTransformationTag (34264): the 4×4 affine matrix, row by row. */
  readonly transformation?: readonly number[];
  /** GeoKeyDirectoryTag (34735), GeoDoubleParamsTag (34736), GeoAsciiParamsTag (34737). */
  readonly geoKeys: readonly number[];
  readonly geoDoubles?: readonly number[];
  readonly geoAscii?: string;
}

export type SampleKind = 'uint8' | 'uint16' | 'float32';

export interface TiffLayout {
  readonly width: number;
  readonly height: number;
  readonly kind: SampleKind;
  /** Written as the GDAL_NODATA tag (42113), which GDAL and the geotiff package read. */
  readonly nodata?: number;
  readonly geo: GeoTags;
  /** Rows in one strip (the unit a reader fetches). */
  readonly rowsPerStrip: number;
}

const BYTES: Record<SampleKind, number> = { uint8: 1, uint16: 2, float32: 4 };
/** TIFF SampleFormat: 1 unsigned integer, 3 IEEE float. */
const SAMPLE_FORMAT: Record<SampleKind, number> = { uint8: 1, uint16: 1, float32: 3 };
const SHORT = 3;
const LONG = 4;
const DOUBLE = 12;
const ASCII = 2;
/** Classic TIFF addresses bytes with 32-bit offsets. */
const CLASSIC_TIFF_LIMIT = 2 ** 32 - 1;

/**
 * A GeoTIFF written strip by strip, uncompressed, little-endian (TIFF 6.0; GeoTIFF 1.1, OGC 19-008r4):
 * rows are appended as they are made, and the directory goes at the end, so memory holds one band
 * of rows, not the image. Written to a temporary file beside the target and renamed at `finish`.
 *
 * Why not the geotiff package's writer: `writeArrayBuffer` takes every value of the image at once
 * and builds the whole file in one ArrayBuffer. Measured (`npm run bench -- raster`, which runs
 * scripts/bench/raster-writer.ts; node 20, one 4,000 × 4,000 Float32 map, 64 MB): 9.95 s and a peak
 * RSS of 179 MB with it, against 0.40 s and 58 MB here (256 rows at a time). Its memory grows with
 * the image (values plus file; for one 10⁸-pixel map about 0.8 GB — an estimate, not run) and one
 * map is written per state and shown year. Files written here are read back by the geotiff package and by GDAL in
 * test/report/probability-maps.test.ts.
 */
export class StripTiffWriter {
  private readonly fd: number;
  private readonly temporary: string;
  private written = 0;
  private readonly rowBytes: number;
  private finished = false;

  constructor(private readonly file: string, private readonly layout: TiffLayout) {
    this.rowBytes = layout.width * BYTES[layout.kind];
    const dataBytes = this.rowBytes * layout.height;
    if (dataBytes + 64 * 1024 > CLASSIC_TIFF_LIMIT) {
      throw new SereError('TOO_LARGE', `a ${layout.width} × ${layout.height} ${layout.kind} image is past the 4 GB of a classic TIFF`,
        { file }, 'split the area into parts (BigTIFF output is not written yet)');
    }
    this.temporary = join(dirname(file), `.${basename(file)}.${process.pid}.tmp`);
    try {
      this.fd = openSync(this.temporary, 'w');
    } catch (err) {
      throw new SereError('CANNOT_WRITE', `cannot write the file (${(err as NodeJS.ErrnoException).code ?? 'open failed'})`, { file },
        'check that the folder exists and is writable');
    }
    // Header: little-endian, 42, and the directory's offset (filled in at the end).
    this.put(Buffer.from([0x49, 0x49, 42, 0, 0, 0, 0, 0]), 0);
  }

  /** Append whole rows, top to bottom: `values.length` must be a multiple of the width. */
  writeRows(values: Uint8Array | Uint16Array | Float32Array): void {
    const bytes = Buffer.from(values.buffer, values.byteOffset, values.byteLength);
    if (bytes.length % this.rowBytes !== 0) throw new Error('writeRows: not a whole number of rows');
    this.put(bytes, 8 + this.written);
    this.written += bytes.length;
  }

  /** Write the directory and move the file into place. */
  finish(): void {
    const { width, height, kind, rowsPerStrip, geo, nodata } = this.layout;
    if (this.written !== this.rowBytes * height) throw new Error(`finish: ${this.written} bytes written, ${this.rowBytes * height} expected`);
    const strips = Math.ceil(height / rowsPerStrip);
    const offsets: number[] = [];
    const counts: number[] = [];
    for (let s = 0; s < strips; s++) {
      offsets.push(8 + s * rowsPerStrip * this.rowBytes);
      counts.push(Math.min(rowsPerStrip, height - s * rowsPerStrip) * this.rowBytes);
    }
    const entries: Entry[] = [
      { tag: 256, type: LONG, values: [width] },
      { tag: 257, type: LONG, values: [height] },
      { tag: 258, type: SHORT, values: [BYTES[kind] * 8] },
      { tag: 259, type: SHORT, values: [1] },
      { tag: 262, type: SHORT, values: [1] },
      { tag: 273, type: LONG, values: offsets },
      { tag: 277, type: SHORT, values: [1] },
      { tag: 278, type: LONG, values: [rowsPerStrip] },
      { tag: 279, type: LONG, values: counts },
      { tag: 284, type: SHORT, values: [1] },
      { tag: 339, type: SHORT, values: [SAMPLE_FORMAT[kind]] },
    ];
    if (geo.pixelScale) entries.push({ tag: 33550, type: DOUBLE, values: [...geo.pixelScale] });
    if (geo.tiepoint) entries.push({ tag: 33922, type: DOUBLE, values: [...geo.tiepoint] });
    if (geo.transformation) entries.push({ tag: 34264, type: DOUBLE, values: [...geo.transformation] });
    entries.push({ tag: 34735, type: SHORT, values: [...geo.geoKeys] });
    if (geo.geoDoubles?.length) entries.push({ tag: 34736, type: DOUBLE, values: [...geo.geoDoubles] });
    if (geo.geoAscii) entries.push({ tag: 34737, type: ASCII, values: geo.geoAscii });
    if (nodata !== undefined) entries.push({ tag: 42113, type: ASCII, values: `${Number.isNaN(nodata) ? 'nan' : nodata}` });
    entries.sort((a, b) => a.tag - b.tag);
    let at = 8 + this.written;
    at += at % 2; // a directory starts on a word boundary
    const directory = encodeDirectory(entries, at);
    this.put(directory, at);
    const header = Buffer.alloc(4);
    header.writeUInt32LE(at);
    this.put(header, 4);
    closeSync(this.fd);
    this.finished = true;
    try {
      renameSync(this.temporary, this.file);
    } catch (err) {
      rmSync(this.temporary, { force: true });
      throw new SereError('CANNOT_WRITE', `cannot write the file (${(err as NodeJS.ErrnoException).code ?? 'rename failed'})`, { file: this.file },
        'check that the folder is writable');
    }
  }

  /** Give up: remove the temporary file. */
  abort(): void {
    if (this.finished) return;
    this.finished = true;
    try { closeSync(this.fd); } catch { /* already closed */ }
    rmSync(this.temporary, { force: true });
  }

  private put(bytes: Buffer, position: number): void {
    let done = 0;
    while (done < bytes.length) done += writeSync(this.fd, bytes, done, bytes.length - done, position + done);
  }
}

interface Entry {
  readonly tag: number;
  readonly type: number;
  readonly values: readonly number[] | string;
}

/** An IFD at `at`: count, 12-byte entries, next-IFD 0, then values too long for an entry. */
function encodeDirectory(entries: readonly Entry[], at: number): Buffer {
  const size = (e: Entry): number => (e.type === ASCII ? (e.values as string).length + 1 : (e.values as number[]).length)
    * (e.type === SHORT ? 2 : e.type === LONG ? 4 : e.type === DOUBLE ? 8 : 1);
  const head = 2 + entries.length * 12 + 4;
  const extra = entries.reduce((sum, e) => { const n = size(e); return sum + (n > 4 ? n + (n % 2) : 0); }, 0);
  const out = Buffer.alloc(head + extra);
  out.writeUInt16LE(entries.length, 0);
  let spill = head;
  entries.forEach((e, n) => {
    const base = 2 + n * 12;
    const count = e.type === ASCII ? (e.values as string).length + 1 : (e.values as number[]).length;
    out.writeUInt16LE(e.tag, base);
    out.writeUInt16LE(e.type, base + 2);
    out.writeUInt32LE(count, base + 4);
    const bytes = size(e);
    let target = base + 8;
    if (bytes > 4) {
      out.writeUInt32LE(at + spill, base + 8);
      target = spill;
      spill += bytes + (bytes % 2);
    }
    if (e.type === ASCII) out.write(`${e.values as string}\0`, target, 'latin1');
    else {
      (e.values as number[]).forEach((v, i) => {
        if (e.type === SHORT) out.writeUInt16LE(v, target + 2 * i);
        else if (e.type === LONG) out.writeUInt32LE(v, target + 4 * i);
        else out.writeDoubleLE(v, target + 8 * i);
      });
    }
  });
  return out;
}

/**
 * GeoKeys for a projected CRS named by its EPSG code, pixels as areas, in metres: what the
 * fixture and bench generators stamp on their invented rasters (GeoTIFF 1.1, section 7).
 */
export function projectedGeoKeys(epsg: number): number[] {
  // Header: version 1, revision 1.0, 4 keys; then (key, location 0 = inline, count 1, value).
  return [1, 1, 0, 4, 1024, 0, 1, 1, 1025, 0, 1, 1, 3072, 0, 1, epsg, 3076, 0, 1, 9001];
}
