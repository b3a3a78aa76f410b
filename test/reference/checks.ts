import { readFileSync } from 'node:fs';
import { expect } from 'vitest';

export interface Check {
  id: string;
  source: string;
  provenance: string;
  inputs: Record<string, unknown>;
  expected: Record<string, unknown>;
  tolerance: number;
  tolerance_by_key?: Record<string, number>;
}

const file = JSON.parse(readFileSync(new URL('./markov-checks.json', import.meta.url), 'utf8')) as { checks: Check[] };

/** One published check by id (see README.md here). */
export function check(id: string): Check {
  const found = file.checks.find((c) => c.id === id);
  if (!found) throw new Error(`no reference check '${id}'`);
  return found;
}

export function toleranceOf(c: Check, key: string): number {
  return c.tolerance_by_key?.[key] ?? c.tolerance;
}

/** Element-wise |expected − actual| ≤ tol over numbers, arrays and nested arrays. */
export function expectClose(actual: unknown, expected: unknown, tol: number, label = ''): void {
  if (Array.isArray(expected)) {
    expect(Array.isArray(actual) || ArrayBuffer.isView(actual), `${label} is an array`).toBe(true);
    const a = Array.from(actual as ArrayLike<unknown>);
    expect(a.length, `${label} length`).toBe(expected.length);
    expected.forEach((e, i) => expectClose(a[i], e, tol, `${label}[${i}]`));
    return;
  }
  expect(typeof actual, label).toBe('number');
  expect(Math.abs((actual as number) - (expected as number)), `${label}: ${actual} vs ${expected}`).toBeLessThanOrEqual(tol);
}

export const flat = (rows: number[][]): Float64Array => Float64Array.from(rows.flat());
