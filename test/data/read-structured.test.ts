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
