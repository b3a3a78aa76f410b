import type { TestReport } from '../diagnostics/assumption-tests.js';
import type { PeriodStandout } from '../diagnostics/period-standout.js';

/** The level below which a test's p-value is read as evidence against its assumption: 0.05, common practice. */
export const VERDICT_LEVEL = 0.05;

/** The p-value a verdict rests on: the parametric bootstrap's when there is one (sparse tables), else G²'s. */
export function verdictP(t: TestReport): number {
  return t.pBootstrap ?? t.pG2;
}

/** Per test: what evidence against the assumption says, and what its absence says. */
const WORDS: Record<string, { readonly against: string; readonly none: string }> = {
  'order 0 vs 1': { against: 'the next state depends on the current one ({p}): a chain is needed',
    none: 'no evidence the next state depends on the current one ({p}): the landscape mix alone may forecast as well' },
  'order 1 vs 2': { against: 'the state before the current one matters too ({p}): the chain is not first order, forecasts may mislead',
    none: 'no evidence the state before the current one matters ({p}): first order is enough' },
  periods: { against: 'the survey periods differ ({p}): years vary, and variation: estimated carries that into the forecast bands',
    none: 'no evidence the survey periods differ ({p})' },
  groups: { against: 'the groups of sites differ ({p}): consider one fit per group (sere fit --by)',
    none: 'no evidence the groups of sites differ ({p})' },
};

/** One line per test, in plain words: what the data say about the assumption, with the p-value it rests on. */
export function verdict(t: TestReport): string {
  const p = verdictP(t);
  if (t.df === 0) return `${t.name}: nothing to test (no degrees of freedom)`;
  const words = WORDS[t.name] ?? { against: `${t.meaning} ({p})`, none: `no evidence that ${t.meaning} ({p})` };
  return `${t.name}: ${(p < VERDICT_LEVEL ? words.against : words.none).replace('{p}', `p ${formatP(p)}`)}`;
}

/** "2017→2018 differs most; without it the periods agree, p = 0.41" — or that they still differ. */
export function standoutLine(s: PeriodStandout): string {
  const top = s.ranked[0]!;
  if (!s.withoutTop) return `${top.label} differs most (G² ${top.g2.toFixed(1)})`;
  const rest = s.withoutTop.p < VERDICT_LEVEL ? 'the others still differ' : 'the periods agree';
  const total = s.ranked.reduce((sum, c) => sum + c.g2, 0);
  return `${top.label} differs most (${top.g2.toFixed(1)} of G² ${total.toFixed(1)}); without it ${rest}, p ${formatP(s.withoutTop.p)}`;
}

function formatP(p: number): string {
  if (p >= 0.001) return `= ${p.toFixed(3)}`;
  return p === 0 ? '< 1e-300' : `= ${p.toExponential(1)}`;
}
