import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { bootstrapDraws } from '../../src/uncertainty/bootstrap.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { compareCodePoints } from '../../src/chain/counts.js';

/** The demo table with its body rows in a seeded pseudo-random order (Fisher–Yates on an LCG). */
function shuffledDemo(seed: number): string {
  const [header, ...body] = readFileSync('scenarios/brenhollow/surveys.csv', 'utf8').trimEnd().split('\n');
  let x = seed;
  for (let i = body.length - 1; i > 0; i--) {
    x = (x * 1103515245 + 12345) % 2 ** 31;
    const j = x % (i + 1);
    [body[i], body[j]] = [body[j]!, body[i]!];
  }
  const file = join(mkdtempSync(join(tmpdir(), 'sere-shuffle-')), 'surveys.csv');
  writeFileSync(file, [header, ...body].join('\n') + '\n');
  return file;
}

const fitOf = (file: string) => fitSurvey(readSurveyCsv(file, { columns: DEFAULT_COLUMNS }), DEFAULT_FIT_SETTINGS);

describe('site bootstrap', () => {
  it('gives byte-identical draws for the same seed whatever the order of rows in the table', () => {
    const original = fitOf('scenarios/brenhollow/surveys.csv');
    const shuffled = fitOf(shuffledDemo(11));
    // The shuffle really moved sites: the first row is some other site than BH01.
    expect(readFileSync(shuffledDemo(11), 'utf8').split('\n')[1]!.startsWith('BH01,')).toBe(false);
    const a = bootstrapDraws(original, 200, randomStreams(20261201));
    const b = bootstrapDraws(shuffled, 200, randomStreams(20261201));
    expect(Buffer.from(b.data.buffer).equals(Buffer.from(a.data.buffer))).toBe(true);
    expect(shuffled.sites).toEqual(original.sites);
  });

  it('orders sites by code point, not by UTF-16 unit', () => {
    const ids = ['b', 'a', '\u{1F331}', '\uFF21', 'B'];
    expect([...ids].sort(compareCodePoints)).toEqual(['B', 'a', 'b', '\uFF21', '\u{1F331}']);
  });
});
