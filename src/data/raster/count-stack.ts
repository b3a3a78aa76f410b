import { closeSync, openSync, readSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { SereError, quote } from '../../errors.js';
import { LIMITS } from '../../limits.js';
import { openRaster, checkSameGrid, type Grid, type OpenRaster } from './open-raster.js';
import { readRasterStack, SKIP, type RasterStack } from './stack-file.js';
import { readWindow, readWindows } from './read-band.js';
import { BlockTally, type BlockChoice } from './block-tally.js';

/**
 * The transitions of one zone (or of the whole map), by pairs of rasters: what every fit setting
 * (the step, the states' order) is then read from without touching a pixel again.
 */
export interface RasterTally {
  /** `pairs[u*T + t]`: k×k counts of pixels whose consecutive valid years are rasters u then t. */
  readonly pairs: (Float64Array | undefined)[];
  /** `triples[u*T + t]`: k³ runs of three valid years w → u → t with equal gaps, keyed by the last pair. */
  readonly triples: (Float64Array | undefined)[];
  /** `history[t*k + s]`: valid pixels in state s in raster t. */
  readonly history: Float64Array;
}

export interface RasterCounts {
  readonly stack: RasterStack;
  /** SHA-256 of the stack file and every raster's bytes, in year order. */
  readonly sha256: string;
  readonly years: readonly number[];
  /** The states, in the counter's own order (fits reorder them). */
  readonly states: readonly string[];
  /** True when states are raw class codes (no labels): they sort as numbers. */
  readonly numericStates: boolean;
  readonly grid: Grid;
  /** Zone codes in ascending order, when a zone raster was given; tallies align with them. */
  readonly zones: readonly number[] | null;
  /** One tally per zone (or one for the whole map). */
  readonly tallies: readonly RasterTally[];
  /** Pixels left out because the zone raster had no zone there. */
  readonly outsideZones: number;
  /** Largest window held at once, in pixels (for the memory note). */
  readonly bandPixels: number;
  /** Per-block counts of the whole map (zones pooled), when asked for (`blocks` option): for the spatial block bootstrap. */
  readonly blocks?: BlockTally;
}

const NO_STATE = -1;
const SKIPPED = -2;
/** Codes are read as 8- or 16-bit whole numbers; a lookup table covers every one. */
const CODES = 65536;

/**
 * Count a raster stack window by window: every raster (and the zone raster) is read one window of
 * whole tiles or strips at a time (`read-band.ts`; `windowPixels` sets their size, for tests), so
 * memory holds a window per raster and 12 bytes per pixel of the window, never a whole map. Each pixel is a site: its consecutive valid
 * years form its survey sequence, exactly as a long table with one site per pixel would (nodata
 * and `skip` codes are years not surveyed) — test/data/raster/count-stack.test.ts checks that.
 */
export async function countRasterStack(file: string,
  options: { readonly windowPixels?: number; readonly blocks?: BlockChoice; readonly onProgress?: (done: number, total: number) => void } = {}): Promise<RasterCounts> {
  const stack = readRasterStack(file);
  const places = stack.rasters.map((r) => stack.locate(r.path));
  const rasters: OpenRaster[] = [];
  let zoneRaster: OpenRaster | undefined;
  try {
    for (const [n, r] of stack.rasters.entries()) rasters.push(await openRaster(r.file, places[n]!));
    zoneRaster = stack.zones === undefined ? undefined : await openRaster(stack.zones, stack.locate(['zones']), 'zone');
    checkSameGrid(zoneRaster ? [...rasters, zoneRaster] : rasters, zoneRaster ? [...places, stack.locate(['zones'])] : places);
    const blocks = options.blocks ? new BlockTally(options.blocks, rasters[0]!.grid.width, rasters[0]!.grid.height) : undefined;
    return await countOpen(stack, rasters, zoneRaster, options.windowPixels, blocks, options.onProgress);
  } finally {
    for (const r of [...rasters, ...(zoneRaster ? [zoneRaster] : [])]) void r.tiff.close();
  }
}

async function countOpen(stack: RasterStack, rasters: readonly OpenRaster[], zoneRaster: OpenRaster | undefined,
  windowPixels: number | undefined, blocks: BlockTally | undefined, onProgress?: (done: number, total: number) => void): Promise<RasterCounts> {
  const T = rasters.length;
  const years = stack.rasters.map((r) => r.year);
  const codes = new CodeStates(stack);
  const zones = new ZoneIndex();
  const tallies: RasterTally[] = [];
  const tallyOf = (z: number): RasterTally => (tallies[z] ??= { pairs: [], triples: [], history: new Float64Array(0) });
  const windows = readWindows(rasters[0]!, windowPixels);
  const pixels = windows.reduce((most, w) => Math.max(most, (w.x1 - w.x0) * (w.y1 - w.y0)), 0);
  const lastState = new Int16Array(pixels);
  const lastRaster = new Int16Array(pixels);
  const prevState = new Int16Array(pixels);
  const prevRaster = new Int16Array(pixels);
  const zoneOf = new Int32Array(pixels);
  const blockOf = blocks ? new Int32Array(pixels) : undefined;
  let outsideZones = 0;
  let k = codes.states.length;
  const grow = (tally: RasterTally): void => {
    // A new state: widen this tally's tables (k only grows, and rarely: once per new class code).
    if (tally.history.length === T * k) return;
    const old = tally.history.length / T;
    const history = new Float64Array(T * k);
    for (let t = 0; t < T; t++) for (let s = 0; s < old; s++) history[t * k + s] = tally.history[t * old + s]!;
    (tally as { history: Float64Array }).history = history;
    tally.pairs.forEach((m, n) => { if (m) tally.pairs[n] = widen(m, old, k, 2); });
    tally.triples.forEach((m, n) => { if (m) tally.triples[n] = widen(m, old, k, 3); });
  };
  for (const [done, window] of windows.entries()) {
    // Windows done so far (of all): the CLI's progress line (cli/progress.ts).
    onProgress?.(done, windows.length);
    const { x0, y0 } = window;
    const across = window.x1 - x0;
    const n = across * (window.y1 - y0);
    lastRaster.fill(-1, 0, n);
    prevRaster.fill(-1, 0, n);
    blocks?.blocksOf(x0, y0, window.x1, window.y1, blockOf!);
    if (zoneRaster) {
      const band = await readWindow(zoneRaster, window);
      const nodata = zoneRaster.nodata;
      for (let p = 0; p < n; p++) {
        const v = band[p]!;
        zoneOf[p] = v === nodata ? -1 : zones.id(v);
        if (zoneOf[p]! < 0) outsideZones += 1;
      }
    } else zoneOf.fill(0, 0, n);
    for (let t = 0; t < T; t++) {
      const raster = rasters[t]!;
      const band = await readWindow(raster, window);
      const nodata = raster.nodata ?? NaN;
      const lut = codes.lut;
      for (let p = 0; p < n; p++) {
        const v = band[p]!;
        if (v === nodata) continue;
        let s = lut[v & 0xffff]!;
        if (s < 0) {
          if (s === SKIPPED) continue;
          s = codes.add(v, raster.file, years[t]!, y0 + Math.floor(p / across), x0 + (p % across));
          k = codes.states.length;
        }
        const z = zoneOf[p]!;
        if (z < 0) continue;
        const tally = tallies[z] ?? tallyOf(z);
        if (tally.history.length !== T * k) grow(tally);
        tally.history[t * k + s] += 1;
        const u = lastRaster[p]!;
        if (u >= 0) {
          const key = u * T + t;
          const pair = tally.pairs[key] ?? (tally.pairs[key] = new Float64Array(k * k));
          const from = lastState[p]!;
          pair[from * k + s] += 1;
          if (blocks) {
            if (blocks.k !== k) blocks.resize(k);
            blocks.table(key)[(blockOf![p]! * k + from) * k + s] += 1;
          }
          const w = prevRaster[p]!;
          if (w >= 0 && years[t]! - years[u]! === years[u]! - years[w]!) {
            const run = tally.triples[key] ?? (tally.triples[key] = new Float64Array(k * k * k));
            run[(prevState[p]! * k + from) * k + s] += 1;
          }
          prevRaster[p] = u;
          prevState[p] = from;
        }
        lastRaster[p] = t;
        lastState[p] = s;
      }
    }
    if (blocks) for (let p = 0; p < n; p++) if (lastRaster[p]! >= 0) blocks.pixels[blockOf![p]!] += 1;
  }
  k = codes.states.length;
  for (const tally of tallies) if (tally) grow(tally);
  blocks?.resize(k);
  const zoneCodes = zoneRaster ? zones.codes() : null;
  return {
    stack, sha256: stackHash(stack), years, states: codes.states, numericStates: stack.labels === undefined,
    grid: rasters[0]!.grid,
    zones: zoneCodes?.order ?? null,
    tallies: zoneCodes ? zoneCodes.order.map((_, z) => tallies[zoneCodes.index[z]!] ?? emptyTally(T, k)) : [tallies[0] ?? emptyTally(T, k)],
    outsideZones, bandPixels: pixels,
    ...(blocks ? { blocks } : {}),
  };
}

function emptyTally(T: number, k: number): RasterTally {
  return { pairs: [], triples: [], history: new Float64Array(T * k) };
}

/** A k_old-state table of `dims` dimensions copied into a k-state one. */
function widen(m: Float64Array, old: number, k: number, dims: 2 | 3): Float64Array {
  const out = new Float64Array(k ** dims);
  if (dims === 2) for (let i = 0; i < old; i++) for (let j = 0; j < old; j++) out[i * k + j] = m[i * old + j]!;
  else {
    for (let i = 0; i < old; i++) for (let j = 0; j < old; j++) for (let l = 0; l < old; l++) out[(i * k + j) * k + l] = m[(i * old + j) * old + l]!;
  }
  return out;
}

/** Class code → state id through a 65,536-entry table (codes are 8- or 16-bit). */
class CodeStates {
  readonly lut = new Int16Array(CODES).fill(NO_STATE);
  readonly states: string[] = [];

  constructor(private readonly stack: RasterStack) {
    if (!stack.labels) return;
    // In the order of their lowest class code: the labels declare the states, and their order.
    const names = [...new Set([...stack.labels].sort((a, b) => a[0] - b[0]).map(([, s]) => s).filter((s) => s !== SKIP))];
    if (names.length > LIMITS.states) {
      throw new SereError('TOO_MANY_STATES', `labels name ${names.length} states, more than ${LIMITS.states}`, stack.locate(['labels']),
        'merge classes into fewer states');
    }
    this.states.push(...names);
    for (const [code, state] of stack.labels) {
      if (code >= CODES) continue; // such a code cannot occur in an 8- or 16-bit raster
      this.lut[code] = state === SKIP ? SKIPPED : names.indexOf(state);
    }
  }

  /** A code the table does not know yet: a new state without labels, an error with them. */
  add(code: number, file: string, year: number, row: number, column: number): number {
    if (this.stack.labels) {
      throw new SereError('UNKNOWN_STATE', `class code ${code} in the ${year} raster (first at row ${row}, column ${column}) is not in labels`,
        { ...this.stack.locate(['labels']), file: this.stack.file },
        `map ${code} to a state (or to skip) under labels in ${this.stack.file}; ${quote(file)} holds it`);
    }
    if (this.states.length === LIMITS.states) {
      throw new SereError('TOO_MANY_STATES', `holds more than ${LIMITS.states} class codes (${code} in ${year}, row ${row}, column ${column})`,
        { file }, 'is it a classified raster? merge classes with labels: in the stack file');
    }
    this.lut[code & 0xffff] = this.states.length;
    this.states.push(String(code));
    return this.states.length - 1;
  }
}

/** Zone code → zone id, in order of first appearance; sorted at the end. */
class ZoneIndex {
  private readonly lut = new Int32Array(CODES).fill(-1);
  private readonly seen: number[] = [];

  id(code: number): number {
    const known = this.lut[code & 0xffff]!;
    if (known >= 0) return known;
    this.lut[code & 0xffff] = this.seen.length;
    this.seen.push(code);
    return this.seen.length - 1;
  }

  /** Zone codes ascending, and for each the id it was counted under. */
  codes(): { order: number[]; index: number[] } {
    const index = this.seen.map((_, n) => n).sort((a, b) => this.seen[a]! - this.seen[b]!);
    return { order: index.map((n) => this.seen[n]!), index };
  }
}

/** SHA-256 over the stack file's own hash and every raster's bytes (zones, then a label-map file, last), so any change shows. */
function stackHash(stack: RasterStack): string {
  const hash = createHash('sha256').update(stack.sha256);
  const buffer = Buffer.alloc(4 * 1024 * 1024);
  for (const file of [...stack.rasters.map((r) => r.file), ...(stack.zones ? [stack.zones] : []), ...(stack.labelsFile ? [stack.labelsFile] : [])]) {
    const fd = openSync(file, 'r');
    try {
      for (let got = readSync(fd, buffer); got > 0; got = readSync(fd, buffer)) hash.update(buffer.subarray(0, got));
    } finally {
      closeSync(fd);
    }
  }
  return hash.digest('hex');
}

/**
 * Class code (as read, & 0xffff) → index into `counted.states`, −1 for nodata, skip and codes never
 * counted: how a map's pixels are read back as states after counting.
 */
export function classLookup(counted: RasterCounts): Int16Array {
  const lut = new Int16Array(CODES).fill(-1);
  if (counted.stack.labels) {
    for (const [code, state] of counted.stack.labels) {
      if (code < CODES && state !== SKIP) lut[code] = counted.states.indexOf(state);
    }
  } else {
    counted.states.forEach((s, n) => { lut[Number(s) & 0xffff] = n; });
  }
  return lut;
}
