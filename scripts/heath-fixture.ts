/**
 * Invented test data — nothing here is a real place, person or survey.
 *
 * Quillanmoor is a fictional upland heath under restoration. 150 permanent plots are surveyed in
 * late summer from 2013 to 2024, the dominant cover recorded as one of five states. The record is
 * as untidy as real monitoring: plots Q101–Q150 were only added in 2017; plots Q071–Q100 are
 * surveyed every other year (even years); and 12% of the other visits after a plot's first were
 * missed. Pairs of consecutive surveys are therefore 1, 2, 3 … years apart, and `sere fit` must
 * use every one of them (test/fit/heath.test.ts). Simulated from TRUE_MATRIX with a fixed seed on
 * sere's own random streams; run `node dist/scripts/heath-fixture.js` (after `npm run build`) to
 * regenerate `test/fixtures/heath/surveys.csv` byte for byte.
 */
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { randomStreams, type RandomStream } from '../src/uncertainty/random.js';

export const STATES = ['bare-peat', 'young-heath', 'mature-heath', 'grassland', 'bracken'] as const;

/** The "true" annual matrix, row = from, column = to. Mature heath cannot turn straight to bare peat (a structural zero). */
export const TRUE_MATRIX: readonly (readonly number[])[] = [
  // bare-peat young-heath mature-heath grassland bracken
  [0.55, 0.25, 0.00, 0.15, 0.05], // bare-peat: seeded heather takes, or grasses get there first
  [0.03, 0.62, 0.25, 0.08, 0.02], // young-heath: matures, or is grazed back to grass
  [0.00, 0.04, 0.88, 0.04, 0.04], // mature-heath: old stands collapse and regenerate
  [0.02, 0.10, 0.03, 0.80, 0.05], // grassland: slowly reverts under lighter grazing
  [0.01, 0.02, 0.02, 0.05, 0.90], // bracken: persistent
];
export const FIRST_MIX = [0.35, 0.2, 0.1, 0.25, 0.1];
export const FIRST_YEAR = 2013;
export const LAST_YEAR = 2024;
export const ADDED_YEAR = 2017;
export const MISSED_VISIT_CHANCE = 0.12;
export const SEED = 20130901;

function pick(random: RandomStream, probabilities: readonly number[]): number {
  let u = random.uniform();
  for (let s = 0; s < probabilities.length - 1; s++) {
    if (u < probabilities[s]!) return s;
    u -= probabilities[s]!;
  }
  return probabilities.length - 1;
}

/**
 * The survey table as CSV text (site,time,state), plots in order, each plot's surveys in time order.
 * With `dated`, the same surveys with the day of each visit (25 July – 3 October, from a stream of
 * its own, so the states are the same) for `--step 1y`.
 */
export function heathSurveys(seed = SEED, dated = false): string {
  return heathRecords(seed, dated).map((r) => `${r.site},${r.time},${STATES[r.state]}`).reduce((text, line) => `${text}${line}\n`, 'site,time,state\n');
}

/** One visit as simulated: the plot, the time (a year or a date), the true state. */
interface Visit { readonly site: string; readonly time: string | number; readonly state: number }

function heathRecords(seed: number, dated: boolean): Visit[] {
  const random = randomStreams(seed).stream('quillanmoor');
  const days = randomStreams(seed).stream('visit-days');
  const visits: Visit[] = [];
  for (let n = 1; n <= 150; n++) {
    const site = `Q${String(n).padStart(3, '0')}`;
    const first = n > 100 ? ADDED_YEAR : FIRST_YEAR;
    const biennial = n > 70 && n <= 100;
    let state = pick(random, FIRST_MIX);
    for (let year = first; year <= LAST_YEAR; year++) {
      if (year > first) state = pick(random, TRUE_MATRIX[state]!);
      const visited = year === first || (biennial ? year % 2 === 0 : random.uniform() >= MISSED_VISIT_CHANCE);
      if (visited) visits.push({ site, time: dated ? visitDate(year, days) : year, state });
    }
  }
  return visits;
}

/** Observer error in the invented survey: the observer who mislabels, and how often. */
export const OBSERVERS = ['Avery', 'Brook', 'Corran'] as const;
export const MISLABELLER = 'Corran';
export const MISLABEL_CHANCE = 0.1;
/** Assessed (verified) sites per state in the accuracy assessment. */
export const ASSESSED_PER_STATE = 60;

/**
 * The same surveys as heathSurveys (the same true states at the same visits), each made by one of
 * three invented observers (a stream of its own), of whom Corran records young heath as grassland
 * one visit in ten; plus the accuracy assessment: ASSESSED_PER_STATE sites of each true state
 * revisited and verified, each first recorded by an observer picked as the surveys pick them. The
 * table's observer column is for the reader; sere fits one pooled error matrix.
 */
export function heathSurveysWithErrors(seed = SEED): { surveys: string; assessment: string } {
  const { who, recorded, surveys } = observedSurveys(seed, 'observers', 'mislabels', OBSERVERS);
  const counts = new Map<string, number>();
  STATES.forEach((_, state) => {
    for (let n = 0; n < ASSESSED_PER_STATE; n++) {
      const key = `${STATES[recorded(state, OBSERVERS[who.integer(OBSERVERS.length)]!)]},${STATES[state]}`;
      counts.set(key, (counts.get(key) ?? 0) + 1);
    }
  });
  const assessment = ['recorded,verified,n', ...[...counts].map(([key, n]) => `${key},${n}`)].join('\n') + '\n';
  return { surveys, assessment };
}

/** The two observers of the per-observer fixture: Corran mislabels as above, Avery never does. */
export const TWO_OBSERVERS = ['Avery', 'Corran'] as const;

/**
 * The same surveys as heathSurveys, each made by one of two invented observers (a stream of its
 * own): Corran records young heath as grassland one visit in ten, Avery records every state as it
 * is. The accuracy assessment has an observer column: ASSESSED_PER_STATE sites of each true state
 * verified for each observer, recorded as that observer records. For one error matrix per
 * observer (test/fit/observer-fit.test.ts): the fit should find Corran's rate near 0.1, Avery's
 * near 0.
 */
export function heathSurveysByObserver(seed = SEED): { surveys: string; assessment: string } {
  const { recorded, surveys } = observedSurveys(seed, 'two-observers', 'two-observers:mislabels', TWO_OBSERVERS);
  const rows = ['observer,recorded,verified,n'];
  for (const observer of TWO_OBSERVERS) {
    const counts = new Map<string, number>();
    STATES.forEach((_, state) => {
      for (let n = 0; n < ASSESSED_PER_STATE; n++) {
        const key = `${STATES[recorded(state, observer)]},${STATES[state]}`;
        counts.set(key, (counts.get(key) ?? 0) + 1);
      }
    });
    for (const [key, n] of counts) rows.push(`${observer},${key},${n}`);
  }
  return { surveys, assessment: rows.join('\n') + '\n' };
}

/**
 * heathRecords' visits, each made by an observer picked on stream `whoStream`; MISLABELLER records
 * young heath as grassland with MISLABEL_CHANCE (stream `slipStream`). Returns the survey table,
 * and the picker and the recording rule for the assessment, which goes on drawing from both streams.
 */
function observedSurveys(seed: number, whoStream: string, slipStream: string, observers: readonly string[]):
  { who: RandomStream; recorded: (state: number, observer: string) => number; surveys: string } {
  const who = randomStreams(seed).stream(whoStream);
  const slips = randomStreams(seed).stream(slipStream);
  const youngHeath = STATES.indexOf('young-heath');
  const grassland = STATES.indexOf('grassland');
  const recorded = (state: number, observer: string): number =>
    (observer === MISLABELLER && state === youngHeath && slips.uniform() < MISLABEL_CHANCE ? grassland : state);
  let surveys = 'site,time,state,observer\n';
  for (const v of heathRecords(seed, false)) {
    const observer = observers[who.integer(observers.length)]!;
    surveys += `${v.site},${v.time},${STATES[recorded(v.state, observer)]},${observer}\n`;
  }
  return { who, recorded, surveys };
}

/** A late-summer visit day: 25 July plus 0–70 days. */
function visitDate(year: number, random: RandomStream): string {
  const date = new Date(Date.UTC(year, 6, 25) + random.integer(71) * 86_400_000);
  return date.toISOString().slice(0, 10);
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  writeFileSync('test/fixtures/heath/surveys.csv', heathSurveys());
  writeFileSync('test/fixtures/heath/surveys-dated.csv', heathSurveys(SEED, true));
  const withErrors = heathSurveysWithErrors();
  writeFileSync('test/fixtures/heath/surveys-observed.csv', withErrors.surveys);
  writeFileSync('test/fixtures/heath/accuracy.csv', withErrors.assessment);
  const byObserver = heathSurveysByObserver();
  writeFileSync('test/fixtures/heath/surveys-two-observers.csv', byObserver.surveys);
  writeFileSync('test/fixtures/heath/accuracy-by-observer.csv', byObserver.assessment);
  console.log('wrote test/fixtures/heath/surveys.csv, surveys-dated.csv, surveys-observed.csv, accuracy.csv, surveys-two-observers.csv and accuracy-by-observer.csv');
}
