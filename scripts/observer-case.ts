import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { SurveyRecord } from '../src/data/survey.js';
import { randomStreams } from '../src/uncertainty/random.js';

/**
 * An invented observer-error case (the `observer` bench's, and test/chain/error-em-support.test.ts's
 * at a smaller size): `sites` sites × 12 yearly surveys × k states, 30% of the visits after each
 * site's first missed, simulated from a chain that mostly stays (20 : 3 to a neighbour : 0.5
 * elsewhere) and seen through an error matrix (92% recorded right, the rest to the neighbouring
 * states), with an assessment of 100 sites per state written as `errors.csv` in `dir`. Seed 41.
 */
/** Surveys a site, and the share of visits after a site's first that are missed. */
export const OBSERVER_SURVEYS = 12;
export const OBSERVER_MISSED = 0.3;

export function observerCase(sites: number, k: number, dir: string): { states: string[]; records: SurveyRecord[]; errors: string } {
  const random = randomStreams(41);
  const pick = (row: Float64Array, offset: number): number => {
    let u = random.uniform();
    let next = 0;
    while (next < k - 1 && u >= row[offset + next]!) { u -= row[offset + next]!; next += 1; }
    return next;
  };
  const p = new Float64Array(k * k);
  const e = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) p[i * k + j] = i === j ? 20 : Math.abs(i - j) === 1 ? 3 : 0.5;
    for (let j = 0; j < k; j++) e[i * k + j] = i === j ? 0.92 : Math.abs(i - j) === 1 ? 0.04 : 0;
    const total = p.subarray(i * k, (i + 1) * k).reduce((a, b) => a + b, 0);
    const errors = e.subarray(i * k, (i + 1) * k).reduce((a, b) => a + b, 0);
    for (let j = 0; j < k; j++) { p[i * k + j] /= total; e[i * k + j] /= errors; }
  }
  const states = Array.from({ length: k }, (_, s) => `s${s}`);
  const records: SurveyRecord[] = [];
  for (let s = 0; s < sites; s++) {
    let state = random.integer(k);
    for (let t = 0; t < OBSERVER_SURVEYS; t++) {
      if (t > 0) state = pick(p, state * k);
      if (t === 0 || random.uniform() >= OBSERVER_MISSED) records.push({ site: `site${s}`, time: 2000 + t, state: pick(e, state * k), line: records.length + 2 });
    }
  }
  const errors = join(dir, 'errors.csv');
  const cells = new Map<string, number>();
  for (let x = 0; x < k; x++) for (let n = 0; n < 100; n++) {
    const key = `${states[pick(e, x * k)]},${states[x]}`;
    cells.set(key, (cells.get(key) ?? 0) + 1);
  }
  writeFileSync(errors, ['recorded,verified,n', ...[...cells].map(([key, n]) => `${key},${n}`)].join('\n') + '\n');
  return { states, records, errors };
}
