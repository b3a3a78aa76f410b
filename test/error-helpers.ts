import { tableFromRecords } from '../src/data/survey-rows.js';
import type { SurveyRecord, SurveyTable } from '../src/data/survey.js';
import type { RandomStream } from '../src/uncertainty/random.js';

/** One draw from a discrete distribution. */
export function pickFrom(random: RandomStream, probabilities: ArrayLike<number>): number {
  let u = random.uniform();
  for (let s = 0; s < probabilities.length - 1; s++) {
    if (u < probabilities[s]!) return s;
    u -= probabilities[s]!;
  }
  return probabilities.length - 1;
}

/**
 * Sites simulated from a known chain and seen through a known error matrix E (row = true,
 * column = recorded): each site starts from `first`, runs `years` steps, each visit missed with
 * chance `missed` (never the first), and the visit records E's draw. Also returns an accuracy
 * assessment of `assessed` sites per true state, drawn through the same E, and each site's true
 * state at the last year.
 */
export function simulateWithErrors(random: RandomStream, p: readonly (readonly number[])[], e: readonly (readonly number[])[],
  first: readonly number[], sites: number, years: number, missed: number, assessed: number):
  { table: SurveyTable; assessment: Float64Array; trueLatest: Float64Array; assessmentCsv: string } {
  const k = p.length;
  const states = Array.from({ length: k }, (_, i) => String.fromCharCode(97 + i));
  const records: SurveyRecord[] = [];
  const trueLatest = new Float64Array(k);
  let line = 2;
  for (let s = 0; s < sites; s++) {
    let state = pickFrom(random, first);
    for (let t = 0; t < years; t++) {
      if (t > 0) state = pickFrom(random, p[state]!);
      const visited = t === 0 || random.uniform() >= missed;
      if (visited) records.push({ site: `s${String(s).padStart(5, '0')}`, time: t, state: pickFrom(random, e[state]!), line: line++ });
    }
    trueLatest[state] += 1;
  }
  const assessment = new Float64Array(k * k);
  for (let x = 0; x < k; x++) for (let n = 0; n < assessed; n++) assessment[x * k + pickFrom(random, e[x]!)] += 1;
  const rows = ['recorded,verified,n'];
  for (let x = 0; x < k; x++) for (let r = 0; r < k; r++) if (assessment[x * k + r]! > 0) rows.push(`${states[r]},${states[x]},${assessment[x * k + r]}`);
  return { table: tableFromRecords('simulated.csv', states, records), assessment, trueLatest, assessmentCsv: rows.join('\n') + '\n' };
}
