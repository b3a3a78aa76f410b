import type { CoverageCheck } from '../evaluation/binomial-test.js';
import type { ScoreSummary } from '../evaluation/site-scores.js';
import { percent } from './numbers.js';

/** A p-value for a sentence: two significant figures, "< 0.001" below that. */
export function pValue(p: number): string {
  return p < 0.001 ? 'p < 0.001' : `p = ${p.toPrecision(2)}`;
}

/** "bands covered 12 of 30 — fewer than a 90% band should (p < 0.001)", or "… — as a 90% band should". */
export function coverageWords(c: CoverageCheck): string {
  const head = `bands covered ${c.covered} of ${c.bands}`;
  if (c.flag === null) return `${head} — within what ${percent(c.level)}% bands give by chance (${pValue(c.p)})`;
  return `${head} — ${c.flag} than ${percent(c.level)}% bands should (${pValue(c.p)})`;
}

/** A skill score as a signed fraction, "—" when undefined. */
export function skillText(x: number | null): string {
  if (x === null) return '—';
  return `${x >= 0 ? '+' : '−'}${Math.abs(x).toFixed(2)}`;
}

/** The columns every score summary shares: the score, the chain beside the baselines, and its skills. */
export const SCORE_HEADINGS = ['score', 'chain', 'persistence', 'climatology', 'skill vs persistence', 'skill vs climatology'];

/** Two rows of cells under SCORE_HEADINGS: the log score (nats per site), then the Brier score. */
export function scoreRows(s: ScoreSummary): [string[], string[]] {
  const row = (name: string, key: 'log' | 'brier'): string[] => [name, s.chain[key].toFixed(3), s.persistence[key].toFixed(3),
    s.climatology[key].toFixed(3), skillText(s.skill[key].persistence), skillText(s.skill[key].climatology)];
  return [row('log', 'log'), row('Brier', 'brier')];
}

export const SCORE_NOTE = 'Each surveyed site scored from its own last recorded state: log score (nats) and Brier score per site, lower is better; ' +
  'skill = 1 − score / reference, above 0 beats the reference (Gneiting & Raftery 2007). Persistence: the site stays; ' +
  'climatology: the landscape mix at the origin (both smoothed by ½ per state).';

/** The line that says which scale was scored when the chain was fitted with an error table. */
export function recordedScaleNote(errors: string): string {
  return `scored on the recorded scale: each site's forecast is its filtered true state carried forward and recorded through the error matrix of the survey's observer (${errors}: one matrix per observer the assessment names, the pooled one otherwise), set against what was recorded`;
}
