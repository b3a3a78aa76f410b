import type { Fit } from '../fit/fit.js';
import type { Place } from '../errors.js';
import { SereError } from '../errors.js';

/**
 * Recorded-scale scoring (recorded-predictive.ts) reads every survey through the draws' one error
 * matrix, the pooled one: with one error matrix per observer that would score each survey through
 * the wrong matrix. Refused in one line, naming the error-table flag or key, until the scoring
 * carries each observer's matrix.
 */
export function refuseObserverScoring(fit: Fit, place: Place | undefined, fallback: Place): void {
  const observers = fit.errorModel?.observers;
  if (!observers) return;
  throw new SereError('BAD_OPTION',
    `scoring on the recorded scale does not yet read each survey through its observer's error matrix, and the error matrix has one per observer (${observers.names.length})`,
    place ?? fallback, 'pool the assessment: drop the error matrix\'s observer column');
}
