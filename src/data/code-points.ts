/**
 * Code-point order. JavaScript's default sort compares UTF-16 code units, which puts characters
 * beyond U+FFFF before U+E000–U+FFFF; code points give the order other tools (and UTF-8 bytes) give.
 */
export function compareCodePoints(a: string, b: string): number {
  const n = Math.min(a.length, b.length);
  for (let i = 0; i < n; i++) {
    let x = a.charCodeAt(i);
    let y = b.charCodeAt(i);
    if (x === y) continue;
    // Code units order code points except where a surrogate (D800–DFFF, part of a code point
    // beyond U+FFFF) meets E000–FFFF: lift surrogates above and lower E000–FFFF below (as ICU does).
    if (x >= 0xd800 && y >= 0xd800) {
      x = x >= 0xe000 ? x - 0x800 : x + 0x2000;
      y = y >= 0xe000 ? y - 0x800 : y + 0x2000;
    }
    return x - y;
  }
  return a.length - b.length;
}

/** Labels sorted in code-point order. */
export function sortByCodePoints(labels: readonly string[]): string[] {
  return [...labels].sort(compareCodePoints);
}
