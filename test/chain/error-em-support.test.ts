import { createHash } from 'node:crypto';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { SurveyRecord } from '../../src/data/survey.js';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import { fitMle, fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';

// error-em.ts sums each E-step over the states a record allows only. Every term it leaves out is an
// exact +0, so EM must return the same bits as the E-step over all k states did. The digest below
// was recorded from the build before that change (sums over all k; 2026-12-03), on this invented
// case: 2,000 sites × 12 surveys × 5 states, 30% of visits missed, an error matrix confusing each
// state with its neighbours only (as the observer bench, at a smaller size).
const K = 5;
const SITES = 2000;

function pick(random: RandomStream, row: Float64Array, offset: number): number {
  let u = random.uniform();
  let next = 0;
  while (next < K - 1 && u >= row[offset + next]!) { u -= row[offset + next]!; next += 1; }
  return next;
}

const hex = (values: ArrayLike<number>): string =>
  Array.from(Float64Array.from(values), (v) => Buffer.from(new Float64Array([v]).buffer).toString('hex')).join(',');

describe('EM with observer error, over each record\'s support', () => {
  it('returns the bits of the E-step over all k states', () => {
    const random = randomStreams(41);
    const p = new Float64Array(K * K);
    const e = new Float64Array(K * K);
    for (let i = 0; i < K; i++) {
      for (let j = 0; j < K; j++) p[i * K + j] = i === j ? 20 : Math.abs(i - j) === 1 ? 3 : 0.5;
      for (let j = 0; j < K; j++) e[i * K + j] = i === j ? 0.92 : Math.abs(i - j) === 1 ? 0.04 : 0;
      const total = p.subarray(i * K, (i + 1) * K).reduce((a, b) => a + b, 0);
      const errors = e.subarray(i * K, (i + 1) * K).reduce((a, b) => a + b, 0);
      for (let j = 0; j < K; j++) { p[i * K + j] /= total; e[i * K + j] /= errors; }
    }
    const states = Array.from({ length: K }, (_, s) => `s${s}`);
    const records: SurveyRecord[] = [];
    for (let s = 0; s < SITES; s++) {
      let state = random.integer(K);
      for (let t = 0; t < 12; t++) {
        if (t > 0) state = pick(random, p, state * K);
        if (t === 0 || random.uniform() >= 0.3) records.push({ site: `site${s}`, time: 2000 + t, state: pick(random, e, state * K), line: records.length + 2 });
      }
    }
    const errors = join(mkdtempSync(join(tmpdir(), 'sere-em-support-')), 'errors.csv');
    const cells = new Map<string, number>();
    for (let x = 0; x < K; x++) for (let n = 0; n < 100; n++) {
      const key = `${states[pick(random, e, x * K)]},${states[x]}`;
      cells.set(key, (cells.get(key) ?? 0) + 1);
    }
    writeFileSync(errors, ['recorded,verified,n', ...[...cells].map(([key, n]) => `${key},${n}`)].join('\n') + '\n');
    const fit = fitSurvey(tableFromRecords('bench.csv', states, records), { ...DEFAULT_FIT_SETTINGS, errors });
    const mle = fitMle(fit) as unknown as Record<string, unknown>;
    const text = Object.keys(mle).map((key) => {
      const v = mle[key];
      return `${key}=${v instanceof Float64Array ? hex(v) : Array.isArray(v) ? JSON.stringify(v) : typeof v === 'number' ? hex([v]) : JSON.stringify(v)}`;
    }).join('\n') + '\n';
    expect(createHash('sha256').update(text).digest('hex')).toBe('96877fb1d8793c515590bdf70ee515280fc70d14194a47b50a3229e592d28bfc');
  });
});
