import { readFileSync, statSync } from 'node:fs';
import { dirname, relative, resolve } from 'node:path';
import { parse } from 'yaml';
import { isRasterStackFile } from '../data/raster/stack-file.js';
import type { RasterCounts } from '../data/raster/count-stack.js';

/**
 * The raster stacks that scenario files name as `data`, as `data` resolves (relative to the
 * scenario file, shown relative to the working folder), each once, and whether a scenario on it
 * wants the bootstrap — then it is counted in blocks, of the first such scenario's
 * `uncertainty.block_size` or chosen from the data (a differing block_size on the same stack is
 * refused when that scenario loads: load-scenario.ts). Only regular files are read (opening a pipe
 * would wait for a writer); a file that cannot be read is left for the loader.
 */
function stackUses(files: readonly string[]): Map<string, { blocks?: number | 'auto'; file?: string }> {
  const stacks = new Map<string, { blocks?: number | 'auto'; file?: string }>();
  for (const file of files) {
    let parsed: { data?: unknown; uncertainty?: { source?: unknown; block_size?: unknown } } | null;
    try {
      if (!statSync(file).isFile()) continue;
      parsed = parse(readFileSync(file, 'utf8')) as typeof parsed;
    } catch {
      continue;
    }
    const data = parsed?.data;
    if (typeof data !== 'string' || !isRasterStackFile(data)) continue;
    const stack = relative(process.cwd(), resolve(dirname(file), data));
    const use = stacks.get(stack) ?? {};
    const u = parsed?.uncertainty;
    if (use.blocks === undefined && u?.source === 'bootstrap') {
      use.blocks = typeof u.block_size === 'number' ? u.block_size : 'auto';
      use.file = file;
    }
    stacks.set(stack, use);
  }
  return stacks;
}

/**
 * Count every raster stack the scenario files name, before they are loaded: reading rasters is
 * asynchronous and loading is not. The raster code (and the geotiff package) is loaded only when
 * a stack is named, so other runs do not pay for it at start-up.
 */
export async function countScenarioStacks(files: readonly string[], progress: boolean): Promise<Map<string, RasterCounts> | undefined> {
  const stacks = stackUses(files);
  if (stacks.size === 0) return undefined;
  const { countStack } = await import('./count-blocks.js');
  const counted = new Map<string, RasterCounts>();
  for (const [stack, use] of stacks) counted.set(stack, await countStack(stack, use.blocks, { file: use.file, path: 'uncertainty.block_size' }, progress));
  return counted;
}

