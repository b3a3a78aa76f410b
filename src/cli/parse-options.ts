import { InvalidArgumentError } from 'commander';
import { LIMITS } from '../limits.js';

/**
 * Option parsers: a malformed or out-of-range flag value is a usage error (exit 2), raised by
 * commander with the flag's name. Every bound comes from LIMITS, the same as for files.
 */
export function wholeNumber(max: number): (value: string) => number {
  return (value: string): number => {
    const n = Number(value);
    if (!/^\s*\d+\s*$/.test(value) || !(n > 0) || !Number.isSafeInteger(n) || n > max) {
      throw new InvalidArgumentError(`expected a whole number from 1 to ${max}.`);
    }
    return n;
  };
}

/** A list of whole numbers such as 1,2,5, each from 1 to `max`. */
export function wholeNumberList(max: number, example: string): (value: string) => number[] {
  return (value: string): number[] => value.split(',').map((v) => {
    const n = Number(v);
    if (!/^\s*\d+\s*$/.test(v) || !(n > 0) || !Number.isSafeInteger(n) || n > max) {
      throw new InvalidArgumentError(`expected whole numbers from 1 to ${max}, such as ${example}.`);
    }
    return n;
  });
}

export const seedFlag = wholeNumber(LIMITS.seed);
export const drawsFlag = wholeNumber(LIMITS.draws);
export const threadsFlag = wholeNumber(LIMITS.threads);
export const replicatesFlag = wholeNumber(LIMITS.replicates);
/** Years ahead, and the survey step: up to the longest horizon. */
export const yearsFlag = wholeNumber(LIMITS.horizonSteps);

export function level(value: string): number {
  const x = Number(value);
  if (value.trim() === '' || !(x > 0 && x < 1)) throw new InvalidArgumentError('expected a number between 0 and 1, e.g. 0.9.');
  return x;
}

export function commaList(value: string, previous: string[] = []): string[] {
  return [...previous, ...value.split(',').map((s) => s.trim()).filter((s) => s !== '')];
}

/** `--variation`: none (the fixed-matrix chain) or estimated (from the record's survey periods). */
export function variationFlag(value: string): 'none' | 'estimated' {
  if (value === 'none' || value === 'estimated') return value;
  throw new InvalidArgumentError("expected none or estimated.");
}
