import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { z } from 'zod';
import { describe, expect, it } from 'vitest';
import { readJsonStructured } from '../../src/data/read-json.js';
import { readStructured } from '../../src/data/read-structured.js';
import { SereError } from '../../src/errors.js';

const write = (text: string): string => {
  const file = join(mkdtempSync(join(tmpdir(), 'sere-json-')), 'x.json');
  writeFileSync(file, text);
  return file;
};
const schema = z.object({ states: z.array(z.string()), counts: z.array(z.number().int()) }).loose();
const outcome = (read: typeof readStructured, file: string): unknown => {
  try {
    const { value, locate } = read(file, schema, 'fit file', 'BAD_FIT_FILE');
    return { value, at: locate(['counts', 1]) };
  } catch (err) {
    if (!(err instanceof SereError)) throw err;
    return { code: err.code, place: err.place, message: err.message };
  }
};

describe('reading a JSON file with JSON.parse, positions only when asked', () => {
  const texts = [
    '{\n  "states": ["a", "b"],\n  "counts": [\n    1,\n    2\n  ]\n}\n',
    // A key twice: JSON.parse would keep the last one; the YAML reader refuses the file.
    '{\n  "states": ["a", "b"],\n  "counts": [1, 2],\n  "counts": [3, 4]\n}\n',
    // Not JSON but YAML (a hand-written fit file): read as before.
    'states: [a, b]\ncounts:\n  - 1\n  - 2\n',
    // Fails the schema: the message and place are the YAML reader's.
    '{\n  "states": ["a", "b"],\n  "counts": [1, 2.5]\n}\n',
    '{ "states": ["a"], "counts": [1, 2], "__proto__": 3 }',
    '{ "states": ["a", "b"], "counts": [1, 2], }',
  ];
  for (const text of texts) {
    it(`reads ${JSON.stringify(text.slice(0, 40))}… exactly as the YAML reader does`, () => {
      const file = write(text);
      expect(outcome(readJsonStructured, file)).toEqual(outcome(readStructured, file));
    });
  }

  it('locates a key path at its line after a fast read', () => {
    const { locate } = readJsonStructured(write(texts[0]!), schema, 'fit file', 'BAD_FIT_FILE');
    expect(locate(['counts', 1])).toMatchObject({ line: 5, column: 5, path: 'counts[1]' });
  });
});
