import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { z } from 'zod';
import { describe, expect, it } from 'vitest';
import { readStructured } from '../../src/data/read-structured.js';
import { SereError } from '../../src/errors.js';

const write = (text: string): string => {
  const file = join(mkdtempSync(join(tmpdir(), 'sere-yaml-')), 'x.yaml');
  writeFileSync(file, text);
  return file;
};

describe('a key named __proto__', () => {
  const schema = z.strictObject({ shares: z.record(z.string(), z.number().max(1)) });

  it('survives validation as an ordinary own key, beside constructor and toString', () => {
    const { value } = readStructured(write('shares: { __proto__: 0.5, constructor: 0.25, toString: 0.25 }\n'), schema, 'scenario file', 'BAD_SCENARIO');
    expect(Object.entries(value.shares)).toEqual([['__proto__', 0.5], ['constructor', 0.25], ['toString', 0.25]]);
    expect(Object.getPrototypeOf(value.shares)).toBe(Object.prototype);
  });

  it('is named as the user wrote it when it is wrong', () => {
    let err: unknown;
    try { readStructured(write('shares:\n  __proto__: 2\n'), schema, 'scenario file', 'BAD_SCENARIO'); } catch (e) { err = e; }
    expect(err).toBeInstanceOf(SereError);
    expect((err as SereError).place).toMatchObject({ line: 2, path: 'shares.__proto__' });
    try { readStructured(write('shares: {}\n__proto__: 1\n'), schema, 'scenario file', 'BAD_SCENARIO'); } catch (e) { err = e; }
    expect((err as SereError).place).toMatchObject({ line: 2, column: 1, path: '__proto__' });
    expect((err as SereError).message).toBe("unknown key '__proto__'");
  });
});

describe('an unknown key', () => {
  const schema = z.strictObject({
    data: z.string().optional(),
    horizon: z.strictObject({ years: z.number() }),
    uncertainty: z.strictObject({ draws: z.number().optional(), seed: z.number().optional() }).optional(),
    treatments: z.array(z.strictObject({ name: z.string(), multiply: z.record(z.string(), z.number()).optional() })).optional(),
  });
  const failure = (text: string): SereError => {
    try { readStructured(write(text), schema, 'scenario file', 'BAD_SCENARIO'); } catch (e) { return e as SereError; }
    throw new Error('no error');
  };

  it('is reported before the required key it misspells, with that key suggested', () => {
    const err = failure('data: a.csv\nhorizen: { years: 10 }\n');
    expect(err.place).toMatchObject({ line: 2, column: 1, path: 'horizen' });
    expect(err.message).toBe("unknown key 'horizen'");
    expect(err.hint).toContain("'horizon'");
  });

  it('gets the one allowed key at its place one or two edits away, inside optional objects and arrays', () => {
    expect(failure('horizon: { years: 1 }\nuncertainty: { drawz: 5 }\n').hint).toContain("'draws'");
    expect(failure('horizon: { years: 1 }\ntreatments:\n  - name: a\n    multipy: { b: 2 }\n')).toMatchObject({
      place: { line: 4, column: 5, path: 'treatments[0].multipy' }, hint: expect.stringContaining("'multiply'") });
    expect(failure('dta: a.csv\nhorizon: { years: 1 }\n').hint).toContain("'data'");
  });

  it('gets no suggestion when no allowed key is near', () => {
    expect(failure('horizon: { years: 1 }\ncolour: red\n').hint).not.toContain('did you mean');
  });
});
