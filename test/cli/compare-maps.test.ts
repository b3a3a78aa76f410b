import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { sereInProcess } from './in-process.js';
import { smallStack, tempFolder } from '../data/raster/raster-fixtures.js';
import { LANDSCAPE_STATES } from '../../scripts/raster/landscape.js';

const temp = tempFolder('sere-compare-maps-');
afterAll(() => temp.remove());
const STATES = LANDSCAPE_STATES.slice(0, 4);

function scenario(folder: string, name: string, body: string): string {
  const file = join(folder, `${name}.yaml`);
  writeFileSync(file, `name: ${name}\ndata: stack.yaml\nfit: { step: 1, states: [${STATES.join(', ')}] }\n` +
    `horizon: { steps: 4 }\nshow: [1, 4]\nuncertainty: { draws: 200, seed: 29 }\nvariation: none\n${body}`);
  return relative(process.cwd(), file);
}

describe('sere compare --maps', () => {
  it('writes each alternative\'s maps into its own folder, the same bytes as sere forecast --maps of it alone (same seed)', async () => {
    const folder = join(temp.folder, 'stack');
    smallStack(folder, { zones: false });
    const a = scenario(folder, 'baseline', '');
    const b = scenario(folder, 'cleared', 'treatments: [{ name: clear, state: scrub, set: { bare: 0.4 }, area: 0.3 }]\n');
    const out = relative(process.cwd(), join(folder, 'maps'));
    const run = await sereInProcess(['compare', a, b, '--maps', out]);
    expect(run.code).toBe(0);
    expect(readdirSync(out).sort()).toEqual(['baseline', 'cleared']);
    for (const [name, file] of [['baseline', a], ['cleared', b]] as const) {
      const alone = relative(process.cwd(), join(folder, `alone-${name}`));
      expect((await sereInProcess(['forecast', file!, '--maps', alone])).code).toBe(0);
      const written = readdirSync(join(out, name!)).sort();
      expect(written).toEqual(readdirSync(alone).sort());
      expect(written.length).toBe(STATES.length * 2 + 1);
      for (const f of written) expect(readFileSync(join(out, name!, f)).equals(readFileSync(join(alone, f)))).toBe(true);
    }
    // The treatment moved the maps: the two alternatives' area tables differ.
    expect(readFileSync(join(out, 'cleared', 'expected-area.csv'), 'utf8')).not.toBe(readFileSync(join(out, 'baseline', 'expected-area.csv'), 'utf8'));
    // Never overwritten unasked: a second run refuses before writing.
    const again = await sereInProcess(['compare', a, b, '--maps', out, '--debug']);
    expect(again.code).toBe(1);
    expect(again.stderr).toContain('[FILE_EXISTS]');
  });
});
