import { describe, expect, it } from 'vitest';
import { readErrorMatrix } from '../../src/data/read-error-matrix.js';
import { readLabelMap } from '../../src/data/label-map.js';
import { errorOf, tempFiles } from '../helpers.js';

const { write } = tempFiles('sere-errors-');
const states = ['grass', 'heath', 'scrub'];

describe('readErrorMatrix: the long form recorded,verified,n', () => {
  it('puts each count at (verified, recorded), missing cells 0, columns in any order', () => {
    const file = write('ok.csv', 'n,verified,recorded\n40,heath,heath\n4,heath,grass\n30,grass,grass\n1,grass,heath\n20,scrub,scrub\n');
    const m = readErrorMatrix(file, states);
    // Row = verified (true), column = recorded.
    expect(Array.from(m.counts)).toEqual([30, 1, 0, 4, 40, 0, 0, 0, 20]);
    expect(m.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(m.droppedRows).toBe(0);
  });

  it('passes labels through the label map; a label mapped to skip drops its row', () => {
    const map = readLabelMap(write('map.yaml', '"G": grass\n"H": heath\n"S": scrub\n"?": skip\n'));
    const file = write('mapped.csv', 'recorded,verified,n\nG,G,9\nH,G,1\nH,H,8\nS,S,5\n?,H,3\n');
    const m = readErrorMatrix(file, states, map);
    expect(Array.from(m.counts)).toEqual([9, 1, 0, 0, 8, 0, 0, 0, 5]);
    expect(m.droppedRows).toBe(1);
  });

  it('refuses bad input with a code, line and column', () => {
    const cases: [string, string, { line?: number; column?: number }][] = [
      ['recorded,verified,n\ngrass,grass,3\nmoor,heath,2\nscrub,scrub,1\n', 'UNKNOWN_STATE', { line: 3, column: 1 }],
      ['recorded,verified,n\n', 'EMPTY_FILE', {}],
      ['', 'EMPTY_FILE', {}],
      ['recorded,verified,n\ngrass,grass,-1\n', 'BAD_ERROR_MATRIX', { line: 2, column: 3 }],
      ['recorded,verified,n\ngrass,grass,2.5\n', 'BAD_ERROR_MATRIX', { line: 2, column: 3 }],
      ['recorded,verified,n\ngrass,grass,\n', 'BAD_ERROR_MATRIX', { line: 2, column: 3 }],
      ['recorded,verified,n\ngrass,grass,3\nheath,heath,2\n', 'STATE_NEVER_VERIFIED', {}],
      ['recorded,verified,n\ngrass,grass,3\nheath,heath,2\nscrub,scrub,0\n', 'STATE_NEVER_VERIFIED', {}],
      ['recorded,verified,n\ngrass,grass,3\nheath,heath,2\nscrub,scrub,1\ngrass,grass,1\n', 'DUPLICATE_KEY', { line: 5 }],
      ['recorded,verified\ngrass,grass\n', 'MISSING_COLUMN', { line: 1 }],
      ['recorded,verified,n,note\ngrass,grass,1,x\n', 'BAD_ERROR_MATRIX', { line: 1, column: 4 }],
      // An observer column: empty cells, a name typed two ways, a cell given twice by one observer.
      ['observer,recorded,verified,n\nA,grass,grass,1\n,heath,heath,2\nA,scrub,scrub,1\n', 'EMPTY_VALUE', { line: 3, column: 1 }],
      ['observer,recorded,verified,n\nAnna Berg,grass,grass,1\nanna  berg,heath,heath,2\nA,scrub,scrub,1\n', 'OBSERVER_LOOK_ALIKE', { line: 3, column: 1 }],
      ['recorded,verified,n,observer\ngrass,grass,1,A\nheath,heath,2,B\nscrub,scrub,1,A\ngrass,grass,4,A\n', 'DUPLICATE_KEY', { line: 5 }],
      ['observer,recorded,verified,n\nA\u200B,grass,grass,1\n', 'INVISIBLE_CHARACTER', { line: 2, column: 1 }],
      ['recorded,verified,n\n,grass,1\n', 'EMPTY_VALUE', { line: 2, column: 1 }],
      ['recorded,verified,n\n"grass,grass,1\n', 'NOT_CSV', {}],
    ];
    cases.forEach(([text, code, at], c) => {
      const file = write(`bad-${c}.csv`, text);
      const err = errorOf(() => readErrorMatrix(file, states));
      expect(err.code, text).toBe(code);
      expect(err.place.file).toBe(file);
      if (at.line !== undefined) expect(err.place.line, text).toBe(at.line);
      if (at.column !== undefined) expect(err.place.column, text).toBe(at.column);
    });
  });

  it('with an observer column: each observer\'s counts, in order of first appearance, and their sum as the pooled matrix', () => {
    const file = write('observers.csv', 'observer,recorded,verified,n\nRo,grass,grass,10\nAl,grass,grass,5\nRo,grass,heath,2\nRo,heath,heath,8\n Al ,scrub,scrub,4\nAl,heath,heath,3\n');
    const m = readErrorMatrix(file, states);
    expect(m.observers!.names).toEqual(['Ro', 'Al']);
    expect(m.observers!.lines).toEqual([2, 3]);
    // Row = verified (true), column = recorded; a cell one observer gives and another does not is 0 for the other.
    expect(Array.from(m.observers!.counts)).toEqual([10, 0, 0, 2, 8, 0, 0, 0, 0, /* Al */ 5, 0, 0, 0, 3, 0, 0, 0, 4]);
    expect(Array.from(m.counts)).toEqual([15, 0, 0, 2, 11, 0, 0, 0, 4]);
    // The same cell given by two observers is two cells, not a duplicate; no observer column, no observers.
    expect(readErrorMatrix(write('plain.csv', 'recorded,verified,n\ngrass,grass,1\nheath,heath,1\nscrub,scrub,1\n'), states).observers).toBeUndefined();
  });

  it('names a missing file', () => {
    expect(errorOf(() => readErrorMatrix('no-such-errors.csv', states)).code).toBe('FILE_NOT_FOUND');
  });
});
