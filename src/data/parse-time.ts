export const TIME_OK = 0;
export const TIME_EMPTY = 1;
export const TIME_NOT_WHOLE = 2;
export const TIME_UNSAFE = 3;
export const TIME_NOT_DATE = 4;

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

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

/**
 * A survey date YYYY-MM-DD (ISO 8601 calendar date, the only form accepted: no times, no other
 * orders, so 03-04 is never read as either month) as days since 1970-01-01, proleptic Gregorian,
 * UTC. A date that does not exist (2023-02-29) is TIME_NOT_DATE. Returns one reused object.
 */
export function parseDate(bytes: Uint8Array, start: number, end: number, trim: boolean): ParsedTime {
  const raw = Buffer.from(bytes.buffer, bytes.byteOffset + start, end - start).toString('utf8');
  const text = trim ? raw.trim() : raw;
  parsed.text = text;
  parsed.value = Number.NaN;
  if (text === '') { parsed.status = TIME_EMPTY; return parsed; }
  const m = ISO_DATE.exec(text);
  const [y, mo, d] = m ? [Number(m[1]), Number(m[2]), Number(m[3])] : [0, 0, 0];
  const days = Date.UTC(y, mo - 1, d) / 86_400_000;
  const back = new Date(days * 86_400_000);
  if (!m || back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d) {
    parsed.status = TIME_NOT_DATE;
    return parsed;
  }
  parsed.status = TIME_OK;
  parsed.value = days;
  return parsed;
}
