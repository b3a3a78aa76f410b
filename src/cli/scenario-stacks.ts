import { readFileSync, statSync } from 'node:fs';
import { dirname, relative, resolve } from 'node:path';
import { parse } from 'yaml';
import { isRasterStackFile } from '../data/raster/stack-file.js';
import type { RasterCounts } from '../data/raster/count-stack.js';
import { progressReporter } from './progress.js';

/**
 * The raster stacks that scenario files name as `data`, as `data` resolves (relative to the
 * scenario file, shown relative to the working folder), each once. Only regular files are read
 * (opening a pipe would wait for a writer); a file that cannot be read is left for the loader.
 */
export function stacksNamedBy(files: readonly string[]): string[] {
  const stacks = new Set<string>();
  for (const file of files) {
    let data: unknown;
    try {
      if (!statSync(file).isFile()) continue;
      data = (parse(readFileSync(file, 'utf8')) as { data?: unknown } | null)?.data;
    } catch {
      continue;
    }
    if (typeof data === 'string' && isRasterStackFile(data)) stacks.add(relative(process.cwd(), resolve(dirname(file), data)));
  }
  return [...stacks];
}

/**
 * Count every raster stack the scenario files name, before they are loaded: reading rasters is
 * asynchronous and loading is not. The raster code (and the geotiff package) is loaded only when
 * a stack is named, so other runs do not pay for it at start-up.
 */
export async function countScenarioStacks(files: readonly string[], progress: boolean): Promise<Map<string, RasterCounts> | undefined> {
  const stacks = stacksNamedBy(files);
  if (stacks.length === 0) return undefined;
  const counted = new Map<string, RasterCounts>();
  for (const stack of stacks) counted.set(stack, await countStack(stack, progress));
  return counted;
}

/**
 * Count one raster stack (the raster code loaded only now), with a progress line on stderr when it
 * is a terminal and the counting takes long enough (cli/progress.ts): the share of windows done.
 */
export async function countStack(file: string, progress: boolean): Promise<RasterCounts> {
  const { countRasterStack } = await import('../data/raster/count-stack.js');
  const bar = progressReporter(progress, 'counting pixels', 'percent');
  try {
    return await countRasterStack(file, { onProgress: (done, total) => bar.update(Math.floor((100 * done) / total), 100) });
  } finally {
    bar.stop();
  }
}
