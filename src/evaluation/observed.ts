import type { SurveyRows } from '../data/survey.js';
import { surveyedMixes, type MixAtTime } from '../chain/latest-mix.js';

export type ObservedMix = MixAtTime;

/** The surveyed mix at every survey time, by time: the observations forecasts are scored against. */
export function observedMixes(rows: SurveyRows, k: number): Map<number, ObservedMix> {
  return new Map(surveyedMixes(rows, k).map((m) => [m.time, m]));
}
