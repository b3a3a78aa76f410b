import { InvalidArgumentError } from 'commander';

/** Option parsers: a malformed flag value is a usage error (exit 2), raised by commander. */
export function positiveInteger(value: string): number {
  const n = Number(value);
  if (!/^\d+$/.test(value.trim()) || !(n > 0) || !Number.isSafeInteger(n)) {
    throw new InvalidArgumentError('expected a whole number above 0.');
  }
  return n;
}

export function level(value: string): number {
  const x = Number(value);
  if (value.trim() === '' || !(x > 0 && x < 1)) throw new InvalidArgumentError('expected a number between 0 and 1, e.g. 0.9.');
  return x;
}

export function commaList(value: string, previous: string[] = []): string[] {
  return [...previous, ...value.split(',').map((s) => s.trim()).filter((s) => s !== '')];
}
