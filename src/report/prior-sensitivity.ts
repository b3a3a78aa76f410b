import type { ChalkInstance } from 'chalk';
import type { PriorReliance } from '../chain/prior-reliance.js';
import { FEW_LEAVING, PRIOR_SHARE_OF_LEAVING } from '../chain/prior-reliance.js';
import { SENSITIVITY_PRIORS } from '../engine/prior-sensitivity.js';
import { percent } from './numbers.js';
import { makeTable } from './style.js';

/** Why a row counts as resting on the prior, in a few words (the rule is in chain/prior-reliance.ts). */
export function relianceReason(r: PriorReliance): string {
  if (r.reason === 'never-from') return 'never surveyed as a from-state: its row is the prior';
  if (r.leaving === 0) return `never seen to leave (${r.observed} transitions, all staying)`;
  if (r.reason === 'rarely-left') return `seen to leave ${r.leaving} time${r.leaving === 1 ? '' : 's'} (under ${FEW_LEAVING})`;
  return `left ${r.leaving} times; the prior adds ${r.priorLeaving} (${percent(r.priorLeaving / (r.priorLeaving + r.leaving))}% of the evidence)`;
}

const PRIORS_LABEL = SENSITIVITY_PRIORS.map(String).join(' · ');
const shares = (xs: readonly (number | null)[]): string => xs.map((x) => (x === null ? '—' : percent(x))).join(' · ');

/**
 * The prior-sensitivity table: per state that rests on the prior, its share under each prior
 * (columns: [title, values per prior] pairs), then the rule and the method in a footnote.
 */
export function priorSensitivityLines(states: readonly string[],
  rows: readonly { readonly reliance: PriorReliance; readonly columns: readonly (readonly (number | null)[])[] }[],
  titles: readonly string[], style: ChalkInstance): string[] {
  if (rows.length === 0) return [];
  const table = makeTable(['state', 'why', ...titles.map((t) => `${t}, % (${PRIORS_LABEL})`)], style,
    ['left', 'left', ...titles.map(() => 'right' as const)]);
  for (const r of rows) table.push([states[r.reliance.state]!, relianceReason(r.reliance), ...r.columns.map(shares)]);
  return [style.bold(`What rests on the prior — shares under priors ${PRIORS_LABEL} per possible transition (0.5 = Jeffreys, 1 = uniform)`),
    table.toString(),
    style.dim(`A state is listed when it was never surveyed as a from-state, was seen to leave fewer than ${FEW_LEAVING} times, or the prior ` +
      `makes up ${percent(PRIOR_SHARE_OF_LEAVING)}% or more of the evidence on leaving it. Computed from the posterior mean matrix under ` +
      'each prior (no sampling), so they can differ from medians over draws; where they differ widely, the data do not settle the answer.')];
}
