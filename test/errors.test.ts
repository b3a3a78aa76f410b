import { describe, expect, it } from 'vitest';
import { SereError, formatError, quote } from '../src/errors.js';

describe('quoting user input in messages', () => {
  it('shows control and invisible characters as escapes', () => {
    expect(quote('a\nb\r\tc\u001b[31m')).toBe("'a\\nb\\r\\tc\\u001b[31m'");
    expect(quote('grass\u200b')).toBe("'grass\\u200b'");
    expect(quote('\u202eevil')).toBe("'\\u202eevil'");
    expect(quote('tag\u{e0041}')).toBe("'tag\\u{e0041}'");
  });

  it('keeps labels of up to 60 characters whole and cuts longer ones to 57 and an ellipsis', () => {
    const sixty = 'x'.repeat(60);
    expect(quote(sixty)).toBe(`'${sixty}'`);
    expect(quote(`${sixty}y`)).toBe(`'${'x'.repeat(57)}…'`);
    // Counted in code points: 60 emoji (120 UTF-16 units) are not cut, and a cut never splits a pair.
    expect(quote('🌱'.repeat(60))).toBe(`'${'🌱'.repeat(60)}'`);
    expect(quote('🌱'.repeat(61))).toBe(`'${'🌱'.repeat(57)}…'`);
  });

  it('cuts a 10 MB label to a short quote', () => {
    expect(quote('z'.repeat(10_000_000)).length).toBe(60);
  });
});

describe('the one-line message', () => {
  it('escapes control characters in the message, the place and the hint', () => {
    const err = new SereError('UNKNOWN_STATE', 'bad\nthing', { file: 'a\nb.csv', line: 3, path: 'x\ty' }, 'fix\u001b[2J it');
    const line = formatError(err);
    expect(line).toBe('a\\nb.csv:3 (x\\ty): bad\\nthing — fix\\u001b[2J it');
    expect(line).not.toMatch(/[\u0000-\u001f\u007f]/);
  });

  it('stays bounded even when a message was built without quote()', () => {
    const huge = 'q'.repeat(5_000_000);
    const line = formatError(new SereError('BAD_OPTION', `value ${huge}`, { file: huge }, huge));
    expect(line.length).toBeLessThan(3_100);
  });
});
