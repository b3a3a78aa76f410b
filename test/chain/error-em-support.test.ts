import { createHash } from 'node:crypto';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { tableFromRecords } from '../../src/data/survey-rows.js';
import { fitMle, fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { observerCase } from '../../scripts/observer-case.js';

// error-em.ts sums each E-step over the states a record allows only. Every term it leaves out is an
// exact +0, so EM must return the same bits as the E-step over all k states did. The digest below
// was recorded from the build before that change (sums over all k; 2026-12-03), on this invented
// case (scripts/observer-case.ts, the observer bench's at 2,000 sites × 5 states): 12 surveys, 30% of
// visits missed, an error matrix confusing each state with its neighbours only.
const K = 5;
const SITES = 2000;

const hex = (values: ArrayLike<number>): string =>
  Array.from(Float64Array.from(values), (v) => Buffer.from(new Float64Array([v]).buffer).toString('hex')).join(',');

describe('EM with observer error, over each record\'s support', () => {
  it('returns the bits of the E-step over all k states', () => {
    const { states, records, errors } = observerCase(SITES, K, mkdtempSync(join(tmpdir(), 'sere-em-support-')));
    const fit = fitSurvey(tableFromRecords('bench.csv', states, records), { ...DEFAULT_FIT_SETTINGS, errors });
    const mle = fitMle(fit) as unknown as Record<string, unknown>;
    const text = Object.keys(mle).map((key) => {
      const v = mle[key];
      return `${key}=${v instanceof Float64Array ? hex(v) : Array.isArray(v) ? JSON.stringify(v) : typeof v === 'number' ? hex([v]) : JSON.stringify(v)}`;
    }).join('\n') + '\n';
    expect(createHash('sha256').update(text).digest('hex')).toBe('96877fb1d8793c515590bdf70ee515280fc70d14194a47b50a3229e592d28bfc');
  });
});
