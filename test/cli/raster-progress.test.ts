import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { countRasterStack } from '../../src/data/raster/count-stack.js';
import { smallStack, tempFolder } from '../data/raster/raster-fixtures.js';
import { sereInProcess } from './in-process.js';

const temp = tempFolder('sere-raster-progress-');
afterAll(() => temp.remove());

describe('progress while counting a raster stack', () => {
  it('reports each window done, in order, of all the windows', async () => {
    const strips = smallStack(join(temp.folder, 'strips'), { rowsPerStrip: 1 });
    const calls: [number, number][] = [];
    // One strip of 37 pixels per window: 29 windows (as in count-stack.test.ts).
    await countRasterStack(strips, { windowPixels: 37, onProgress: (done, total) => calls.push([done, total]) });
    expect(calls.length).toBe(29);
    expect(calls.map(([done]) => done)).toEqual(Array.from({ length: 29 }, (_, n) => n));
    expect(calls.every(([, total]) => total === 29)).toBe(true);
  });

  it('draws nothing when stderr is not a terminal', async () => {
    const stack = smallStack(join(temp.folder, 'plain'));
    const r = await sereInProcess(['fit', stack]);
    expect(r.code).toBe(0);
    expect(r.stderr).not.toContain('counting pixels');
    expect(r.stderr).not.toContain('\u001b[');
  });
});
