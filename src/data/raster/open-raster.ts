import { fromFile, type GeoTIFF, type GeoTIFFImage } from 'geotiff';
import { SereError, type Place } from '../../errors.js';

/** GeoTIFF model types (GeoTIFF 1.1, GTModelTypeGeoKey): 1 projected, 2 geographic, 3 geocentric. */
const MODEL_PROJECTED = 1;
/** Linear units (ProjLinearUnitsGeoKey, EPSG unit codes) → metres. */
const METRES_PER_UNIT: ReadonlyMap<number, number> = new Map([[9001, 1], [9002, 0.3048], [9003, 1200 / 3937]]);

/** One classified raster, opened: its grid, what its pixels hold, and the image to read from. */
export interface OpenRaster {
  readonly file: string;
  readonly tiff: GeoTIFF;
  readonly image: GeoTIFFImage;
  readonly grid: Grid;
  /** The GDAL_NODATA value, when the file has one. */
  readonly nodata: number | null;
  /** Rows a reader fetches at once: the tile height, or rows per strip. */
  readonly blockRows: number;
}

/** What two rasters must share to be read pixel by pixel together. */
export interface Grid {
  readonly width: number;
  readonly height: number;
  /** x and y of the top-left corner, in CRS units. */
  readonly origin: readonly [number, number];
  /** Pixel width and height (height negative for north-up), in CRS units. */
  readonly resolution: readonly [number, number];
  /** The CRS, as its GeoKeys (a stable JSON text), for comparing. */
  readonly crs: string;
  /** The EPSG code of the projected CRS, when the file names one. */
  readonly epsg: number | null;
  /** Area of one pixel in square metres. */
  readonly pixelArea: number;
  readonly geoKeys: Record<string, unknown>;
}

/**
 * Open a classified raster with the geotiff package (metadata only; pixels are read by band later)
 * and check that sere can use it: one band of whole-number class codes, an affine north-up grid,
 * a projected CRS (pixel area from the geotransform). Every problem is one line naming the file.
 */
export async function openRaster(file: string, place: Place, role: 'class' | 'zone' = 'class'): Promise<OpenRaster> {
  let tiff: GeoTIFF;
  let image: GeoTIFFImage;
  try {
    tiff = await fromFile(file);
    image = await tiff.getImage(0);
  } catch (err) {
    throw new SereError('BAD_RASTER', `is not a readable GeoTIFF (${String((err as Error).message ?? err).split('\n')[0]!.slice(0, 80)})`,
      { file }, 'give a GeoTIFF file (.tif) of whole-number class codes');
  }
  const fail = (what: string, hint: string): never => {
    void tiff.close();
    throw new SereError('BAD_RASTER', what, { ...place, file }, hint);
  };
  if (image.getSamplesPerPixel() !== 1) {
    fail(`has ${image.getSamplesPerPixel()} bands; a classified raster has one`, 'write each year\'s classes as a one-band GeoTIFF');
  }
  const format = image.getSampleFormat(0);
  if (format === 3) {
    fail(`holds floating-point values (${image.getBitsPerSample(0)}-bit float), not ${role} codes`,
      `classify it into whole-number ${role} codes first and save as an integer type (e.g. gdal_translate -ot Byte or -ot UInt16)`);
  }
  if (format !== 1 && format !== 2) fail(`holds samples of format ${format}, not whole-number ${role} codes`, 'save it as Byte, UInt16 or Int16');
  if (image.getBitsPerSample(0) > 16) {
    fail(`holds ${image.getBitsPerSample(0)}-bit values; ${role} codes are read as 8- or 16-bit whole numbers`, 'save it as Byte, UInt16 or Int16');
  }
  const geoKeys = (image.getGeoKeys() ?? {}) as Record<string, unknown>;
  const model = geoKeys.GTModelTypeGeoKey;
  if (model === 2) {
    fail('has a geographic CRS (degrees); pixel areas need a projected CRS',
      'reproject it to a projected (equal-area or UTM) CRS first, e.g. gdalwarp -t_srs EPSG:<code>');
  }
  if (model !== MODEL_PROJECTED) fail('has no projected CRS in its GeoKeys; pixel areas need one', 'assign or reproject to a projected CRS first');
  let origin: number[];
  let resolution: number[];
  try {
    origin = image.getOrigin();
    resolution = image.getResolution();
  } catch {
    return fail('has no geotransform (no pixel scale and tie point)', 'georeference it first');
  }
  const transform = image.fileDirectory.getValue('ModelTransformation') as number[] | undefined;
  if (transform && (transform[1] !== 0 || transform[4] !== 0)) {
    fail('has a rotated grid; sere reads north-up grids only', 'warp it to a north-up grid first (gdalwarp)');
  }
  const units = geoKeys.ProjLinearUnitsGeoKey as number | undefined;
  // EPSG projected CRSs in metres leave the unit key out; any other stated unit must be one we know.
  const perUnit = units === undefined ? 1 : METRES_PER_UNIT.get(units);
  if (perUnit === undefined) fail(`states linear unit code ${units}, which sere cannot convert to metres`, 'reproject to a CRS in metres');
  const [rx, ry] = resolution as [number, number];
  const epsg = typeof geoKeys.ProjectedCSTypeGeoKey === 'number' && geoKeys.ProjectedCSTypeGeoKey !== 32767 ? geoKeys.ProjectedCSTypeGeoKey : null;
  const crsKeys = Object.fromEntries(Object.entries(geoKeys).filter(([key]) => key !== 'GTRasterTypeGeoKey' && key !== 'GTCitationGeoKey').sort());
  const grid: Grid = {
    width: image.getWidth(), height: image.getHeight(),
    origin: [origin[0]!, origin[1]!], resolution: [rx, ry],
    crs: JSON.stringify(crsKeys), epsg, pixelArea: Math.abs(rx * ry) * perUnit! * perUnit!, geoKeys,
  };
  const blockRows = image.isTiled ? image.getTileHeight() : Math.max(1, Math.min(image.getHeight(), image.getTileHeight()));
  return { file, tiff, image, grid, nodata: image.getGDALNoData(), blockRows };
}

/** Relative tolerance for comparing origins and pixel sizes written as doubles by different tools. */
const GRID_TOLERANCE = 1e-9;

/** What differs between two grids, or undefined when they match. */
export function gridDifference(a: Grid, b: Grid): string | undefined {
  if (a.width !== b.width || a.height !== b.height) return `size ${a.width} × ${a.height} against ${b.width} × ${b.height} pixels`;
  const near = (x: number, y: number): boolean => Math.abs(x - y) <= GRID_TOLERANCE * Math.max(1, Math.abs(x), Math.abs(y));
  if (!near(a.resolution[0], b.resolution[0]) || !near(a.resolution[1], b.resolution[1])) {
    return `pixel size ${a.resolution[0]} × ${a.resolution[1]} against ${b.resolution[0]} × ${b.resolution[1]}`;
  }
  if (!near(a.origin[0], b.origin[0]) || !near(a.origin[1], b.origin[1])) {
    return `origin (${a.origin[0]}, ${a.origin[1]}) against (${b.origin[0]}, ${b.origin[1]})`;
  }
  // Two files naming an EPSG code are compared by it (tools add citations and unit keys of their own).
  if (a.epsg !== null && b.epsg !== null ? a.epsg !== b.epsg : a.crs !== b.crs) return `CRS ${a.epsg !== null ? `EPSG:${a.epsg}` : 'as GeoKeys'} against ${b.epsg !== null ? `EPSG:${b.epsg}` : 'other GeoKeys'}`;
  return undefined;
}

/** Every raster on the first one's grid, else one line naming both files and what differs. */
export function checkSameGrid(rasters: readonly OpenRaster[], places: readonly Place[]): void {
  const first = rasters[0]!;
  rasters.slice(1).forEach((r, n) => {
    const difference = gridDifference(first.grid, r.grid);
    if (difference !== undefined) {
      throw new SereError('GRID_MISMATCH', `is not on the grid of ${first.file}: ${difference}`, { ...places[n + 1], file: r.file },
        `resample both onto one grid first (same size, pixel size, origin and CRS), e.g. gdalwarp -te … -tr … -t_srs …`);
    }
  });
}

/** The georeferencing tags of a raster, verbatim, for writing outputs on the same grid and CRS. */
export async function geoTagsOf(raster: OpenRaster): Promise<{
  pixelScale?: number[]; tiepoint?: number[]; transformation?: number[]; geoKeys: number[]; geoDoubles?: number[]; geoAscii?: string;
}> {
  const dir = raster.image.fileDirectory;
  const get = async (tag: string): Promise<unknown> => (dir.hasTag(tag as never) ? dir.loadValue(tag as never) : undefined);
  const list = (v: unknown): number[] | undefined => (v === undefined ? undefined : Array.from(v as ArrayLike<number>));
  return {
    pixelScale: list(await get('ModelPixelScale')),
    tiepoint: list(await get('ModelTiepoint')),
    transformation: list(await get('ModelTransformation')),
    geoKeys: list(await get('GeoKeyDirectory')) ?? [],
    geoDoubles: list(await get('GeoDoubleParams')),
    geoAscii: (await get('GeoAsciiParams')) as string | undefined,
  };
}
