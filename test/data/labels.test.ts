import { describe, expect, it } from 'vitest';
import { labelProblem, lookAlikeKey, normaliseLabel } from '../../src/data/labels.js';

describe('labels', () => {
  it('NFC makes a precomposed and a combining accent one label', () => {
    expect(normaliseLabel('fe\u0301n')).toBe('f\u00e9n');
    expect(normaliseLabel('plain-ascii')).toBe('plain-ascii');
  });

  it('finds invisible characters: zero-width, BOM inside a value, bidi controls, control characters', () => {
    for (const c of ['\u200b', '\u200c', '\u200d', '\u2060', '\ufeff', '\u202e', '\u2066', '\u00ad', '\t', '\u0007', '\r']) {
      const problem = labelProblem(`gra${c}ss`, 'state');
      expect(problem?.code, JSON.stringify(c)).toBe('INVISIBLE_CHARACTER');
      expect(problem?.what).toContain('character 4');
    }
    expect(labelProblem('grass', 'state')).toBeUndefined();
    expect(labelProblem('prairie à fétuque', 'state')).toBeUndefined();
  });

  it('refuses labels longer than 200 characters', () => {
    expect(labelProblem('x'.repeat(200), 'site id')).toBeUndefined();
    expect(labelProblem('x'.repeat(201), 'site id')?.code).toBe('LABEL_TOO_LONG');
  });

  it('gives look-alikes one key: case, Cyrillic and Greek letters, full-width forms, no-break spaces, dashes', () => {
    const key = lookAlikeKey('Low marsh-B');
    for (const alike of ['low marsh-b', 'L\u043ew marsh-B', 'Low m\u0430rsh-\u0392', 'Ｌｏｗ marsh-B', 'Low\u00a0marsh-B', 'Low marsh\u2010B']) {
      expect(lookAlikeKey(alike), alike).toBe(key);
    }
    expect(lookAlikeKey('high marsh')).not.toBe(key);
    expect(lookAlikeKey('strasse')).toBe(lookAlikeKey('STRAßE'));
  });
});
