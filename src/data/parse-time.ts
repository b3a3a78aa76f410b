export const TIME_OK = 0;
export const TIME_EMPTY = 1;
export const TIME_NOT_WHOLE = 2;
export const TIME_UNSAFE = 3;

export interface ParsedTime {
  status: number;
  value: number;
  /** The field as text (trimmed), for a message; only set when status is not TIME_OK. */
  text: string;
}

const INTEGER = /^[+-]?\d+$/;
const parsed: ParsedTime = { status: TIME_OK, value: 0, text: '' };

/**
 * A survey time from the bytes of its field: a whole number, optionally signed, within
 * ±(2⁵³ − 1) — as `Number.parseInt` of the trimmed text, after /^[+-]?\d+$/. Up to 15 ASCII
 * digits (every year, day or second count in practice) are read from the bytes directly and are
 * always exact; anything else takes the text path. Returns one reused object: read it at once.
 */
export function parseTime(bytes: Uint8Array, start: number, end: number, trim: boolean): ParsedTime {
  let a = start;
  let b = end;
  if (trim) {
    while (a < b && isSpace(bytes[a]!)) a += 1;
    while (b > a && isSpace(bytes[b - 1]!)) b -= 1;
  }
  let p = a;
  const sign = p < b ? bytes[p]! : 0;
  if (sign === 0x2b || sign === 0x2d) p += 1;
  let value = 0;
  const first = p;
  for (; p < b; p++) {
    const d = bytes[p]! - 0x30;
    if (d < 0 || d > 9) break;
    value = value * 10 + d;
  }
  if (p === b && p > first && p - first <= 15) {
    parsed.status = TIME_OK;
    parsed.value = sign === 0x2d ? -value : value;
    return parsed;
  }
  const raw = Buffer.from(bytes.buffer, bytes.byteOffset + start, end - start).toString('utf8');
  const text = trim ? raw.trim() : raw;
  parsed.text = text;
  parsed.value = Number.NaN;
  if (text === '') parsed.status = TIME_EMPTY;
  else if (!INTEGER.test(text)) parsed.status = TIME_NOT_WHOLE;
  else if (!Number.isSafeInteger(Number(text))) parsed.status = TIME_UNSAFE;
  else {
    parsed.status = TIME_OK;
    parsed.value = Number.parseInt(text, 10);
  }
  return parsed;
}

/** Whitespace as String.prototype.trim sees it, among ASCII bytes: tab, LF, VT, FF, CR, space. */
function isSpace(b: number): boolean {
  return b === 0x20 || (b >= 0x09 && b <= 0x0d);
}
