import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { firstInvalidUtf8, readTextFile } from '../../src/data/read-text-file.js';
import { errorOf } from '../helpers.js';


const dir = (): string => mkdtempSync(join(tmpdir(), 'sere-text-'));

describe('input paths that are not regular files', () => {
  it('refuses a folder and a device before reading', () => {
    expect(errorOf(() => readTextFile(dir(), 'survey table'))).toMatchObject({ code: 'NOT_A_FILE' });
    const zero = errorOf(() => readTextFile('/dev/zero', 'survey table'));
    expect(zero.code).toBe('NOT_A_FILE');
    expect(zero.message).toContain('a device');
  });

  it('refuses a FIFO without blocking on it', () => {
    const fifo = join(dir(), 'pipe.csv');
    const made = spawnSync('mkfifo', [fifo]);
    if (made.status !== 0) throw new Error('mkfifo is needed for this test');
    // Reading would wait for a writer forever; the check must answer at once.
    const err = errorOf(() => readTextFile(fifo, 'survey table'));
    expect(err.code).toBe('NOT_A_FILE');
    expect(err.message).toContain('a pipe');
  });
});

describe('strict UTF-8', () => {
  it('refuses a Latin-1 file, naming the line and column of the first bad byte', () => {
    const file = join(dir(), 'latin1.csv');
    writeFileSync(file, Buffer.concat([Buffer.from('site,time,state\nA,1,été\nB,1,caf'), Buffer.from([0xe9]), Buffer.from('\n')]));
    const err = errorOf(() => readTextFile(file, 'survey table'));
    expect(err.code).toBe('NOT_UTF8');
    expect(err.place).toMatchObject({ file, line: 3, column: 8 });
  });

  it('finds the first invalid byte exactly where a strict decoder fails (property)', () => {
    const strict = new TextDecoder('utf-8', { fatal: true });
    fc.assert(fc.property(fc.uint8Array({ maxLength: 24 }), fc.string({ unit: 'grapheme', maxLength: 6 }), (noise, text) => {
      const bytes = Buffer.concat([Buffer.from(text), noise]);
      const at = firstInvalidUtf8(bytes);
      let valid = true;
      try { strict.decode(bytes); } catch { valid = false; }
      expect(at === -1).toBe(valid);
      if (at >= 0) {
        // Everything before it decodes; the bytes from it onwards do not start with a valid sequence.
        expect(() => strict.decode(bytes.subarray(0, at))).not.toThrow();
      }
    }), { numRuns: 2000 });
  });
});
