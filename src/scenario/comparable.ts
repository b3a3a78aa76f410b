import { SereError } from '../errors.js';
import type { LandscapeTarget, Scenario } from './scenario.js';

/**
 * Alternatives can only be compared on common random numbers when they describe the same
 * landscape and the same question: the same data and fit, start, horizon, step and uncertainty
 * source. Anything else differing is an error naming the file that differs from the baseline.
 */
export function checkComparable(scenarios: readonly Scenario[]): void {
  const [base, ...rest] = scenarios;
  if (!base) return;
  for (const s of rest) {
    const differs = (what: string, hint: string): never => {
      throw new SereError('BAD_SCENARIO', `cannot be compared with ${base.file}: ${what} differs`, { file: s.file }, hint);
    };
    if (s.fit.input.sha256 !== base.fit.input.sha256 || s.fit.states.join('\n') !== base.fit.states.join('\n')
      || s.fit.step !== base.fit.step || s.fit.prior !== base.fit.prior
      || s.fit.impossible.join(';') !== base.fit.impossible.join(';')) {
      differs('the data or fit', 'name the same data with the same fit settings in every alternative');
    }
    if (s.start.year !== base.start.year || s.start.shares.some((x, i) => x !== base.start.shares[i])) {
      differs('the start', 'start every alternative from the same year and mix');
    }
    if (s.horizonSteps !== base.horizonSteps) differs('the horizon', 'give every alternative the same horizon');
    if (s.source !== base.source) differs('the uncertainty source', 'use the same uncertainty source in every alternative');
    if (JSON.stringify({ ...s.variation, concentration: 'concentration' in s.variation ? Array.from(s.variation.concentration, String) : undefined })
      !== JSON.stringify({ ...base.variation, concentration: 'concentration' in base.variation ? Array.from(base.variation.concentration, String) : undefined })) {
      differs('the year-to-year variation', 'use the same variation in every alternative');
    }
    if (s.level !== base.level) differs('the credible level', 'use the same level in every alternative');
    if (!sameTarget(s.target, base.target)) {
      differs('the target', 'give every alternative the same target');
    }
    if ((s.plots?.total ?? 0) !== (base.plots?.total ?? 0)) differs('plots', 'count the same number of plots in every alternative');
  }
}

/** The same question: the same set of states (in any order), bound, threshold and run length. */
function sameTarget(a: LandscapeTarget | undefined, b: LandscapeTarget | undefined): boolean {
  if (!a || !b) return a === b;
  const set = (t: LandscapeTarget): string => [...t.states].sort((x, y) => x - y).join(',');
  return set(a) === set(b) && a.bound === b.bound && a.threshold === b.threshold && a.staysMet === b.staysMet;
}
