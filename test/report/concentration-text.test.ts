import { describe, expect, it } from 'vitest';
import { concentration } from '../../src/report/numbers.js';

describe('a concentration as text', () => {
  it('one decimal below 10, whole numbers from 10, commas between thousands', () => {
    expect(concentration(9.94)).toBe('9.9');
    expect(concentration(12.6)).toBe('13');
    expect(concentration(1404.3)).toBe('1,404');
    expect(concentration(2_345_678)).toBe('2,345,678');
  });
});
