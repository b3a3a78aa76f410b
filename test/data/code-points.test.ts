import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compareCodePoints, sortByCodePoints } from '../../src/data/code-points.js';

describe('code-point order', () => {
  it('is the order of the UTF-8 bytes (property: BMP, private use, beyond U+FFFF)', () => {
    const char = fc.oneof(fc.constantFrom('a', 'B', '\u00e9', '\ue000', '\uff21', '\uffff', '\u{1F331}', '\u{10000}', '\u{10FFFF}'), fc.string({ unit: 'grapheme', maxLength: 1 }));
    const label = fc.array(char, { maxLength: 4 }).map((c) => c.join(''));
    fc.assert(fc.property(label, label, (a, b) => {
      expect(Math.sign(compareCodePoints(a, b))).toBe(Math.sign(Buffer.compare(Buffer.from(a), Buffer.from(b))));
    }), { numRuns: 2000 });
  });

  it('sorts characters beyond U+FFFF after U+E000–U+FFFF', () => {
    expect(sortByCodePoints(['\u{1F331}', '\uFF21', 'b', 'B'])).toEqual(['B', 'b', '\uFF21', '\u{1F331}']);
  });
});
