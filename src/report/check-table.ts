import type { ChalkInstance } from 'chalk';
import type { CheckResult } from '../diagnostics/check.js';
import type { TestReport } from '../diagnostics/assumption-tests.js';
import type { Estimate } from '../diagnostics/chain-properties.js';
import { concentration, count, fitSites, levelLabel, percent } from './numbers.js';
import { makeTable } from './style.js';
import { standoutLine, verdict } from './check-verdicts.js';
import { zoneSamplerLine } from './fit-zones-table.js';
import { zoneSamplerWarnings } from '../fit/zone-sampler.js';

/** The terminal report of `sere check`. */
/**
 * With an error table: the tests above read the recorded counts (the chain's own counts are of
 * hidden true states), and a mislabel looks like a change and back, so observer error alone can
 * make the records fail them; the properties below are of the fitted true chain.
 */
export const RECORDS_TESTED = 'with an error table these tests read the records, not the true states: observer error alone makes records look less ' +
  'Markov (a mislabel looks like a change and back), so a small p may be the observers, not the chain; passage times, settling and ' +
  'sensitivities below are of the fitted true chain';

export function checkTable(r: CheckResult, style: ChalkInstance): string {
  const { fit, settings, tests, properties: pr } = r;
  const states = fit.states;
  const k = states.length;
  const band = levelLabel(settings.level);
  const lines: string[] = [];
  const section = (title: string): void => { lines.push('', style.bold(title)); };

  lines.push(style.bold(`Checking the chain fitted to ${fit.input.file}`));
  lines.push(`${fitSites(fit)} · ${count(fit.transitions, 'transition')} of one ${fit.step}-year step · ` +
    `bands ${band} from ${settings.draws} posterior draws · seed ${r.seed}`);

  section('Does the next state depend only on the current one? (Anderson & Goodman 1957)');
  lines.push(testTable(tests.order, style));
  if (tests.orderSelection) {
    const best = (key: 'aic' | 'bic'): number => Math.min(...tests.orderSelection!.map((o) => o[key]));
    const t = makeTable(['order', 'log-likelihood', 'parameters', 'AIC', 'BIC'], style, ['left', 'right', 'right', 'right', 'right']);
    for (const o of tests.orderSelection) {
      t.push([String(o.order), o.logLikelihood.toFixed(1), String(o.parameters),
        `${o.aic.toFixed(1)}${o.aic === best('aic') ? ' ◂' : ''}`, `${o.bic.toFixed(1)}${o.bic === best('bic') ? ' ◂' : ''}`]);
    }
    lines.push(style.dim('Order selection on runs of three surveys (Tong 1975; Katz 1981): ◂ marks the lowest.'));
    lines.push(t.toString());
  }

  section('Are the probabilities the same across survey periods and groups of sites?');
  const strata = [tests.periods, tests.groups].filter((t): t is TestReport => t !== null);
  if (strata.length > 0) lines.push(testTable(strata, style));
  for (const t of strata) if (t.strata) lines.push(style.dim(`${t.name}: ${t.strata.join(', ')}`));
  if (tests.periodBlocks) {
    lines.push(style.dim(`${tests.periodBlocks.periods} survey periods with few transitions each, tested as ${tests.periodBlocks.blocks} blocks of consecutive periods (--periods to choose others)`));
  }
  for (const why of tests.unavailable) lines.push(style.yellow(`not tested — ${why}`));
  if (fit.errorModel) lines.push(style.yellow(RECORDS_TESTED));
  lines.push(style.dim('A small p-value (below 0.05, say) is evidence against the assumption in that row; ' +
    '"p (sim.)" is a parametric-bootstrap p-value, given when expected counts are small.'));
  if (tests.periodStandout) {
    const s = tests.periodStandout;
    lines.push(`Which period stands out: ${standoutLine(s)}`);
    lines.push(style.dim(`  share of G² by period, largest first: ${s.ranked.slice(0, 5).map((c) => `${c.label} ${c.g2.toFixed(1)}`).join(' · ')}${s.ranked.length > 5 ? ' · …' : ''}`));
  }
  if (r.variation) {
    section(`How alike are the years? κ per state (year-to-year variation: a year's p varies with variance p(1 − p)/(κ + 1)) — median [${band}]`);
    const t = makeTable(['state', 'κ posterior', 'κ most likely', 'periods', 'note'], style, ['left', 'right', 'right', 'right', 'left']);
    states.forEach((name, i) => {
      const v = r.variation![i]!;
      const kappa = v.kappa ? `${concentration(v.kappa.median)} [${concentration(v.kappa.low)}–${concentration(v.kappa.high)}]` : '—';
      const mle = v.mle === null ? '—' : v.mle === Infinity ? '∞ (no spread beyond chance)' : concentration(v.mle);
      t.push([name, kappa, mle, String(v.informativePeriods), VARIATION_NOTE[v.status]]);
    });
    lines.push(t.toString());
    lines.push(style.dim('  Small κ: years differ a lot; large κ: years are alike. Forecasts draw each year\'s matrix with these κ ' +
      '(variation: estimated, the default from three survey periods). Periods: survey periods with two or more transitions from the state.'));
  }
  section('In one line each');
  for (const t of [...tests.order, ...strata]) lines.push(`  ${verdict(t)}`);

  section('Structure (Kemeny & Snell 1960)');
  const s = pr.structure;
  s.classes.forEach((members, c) => {
    const names = members.map((m) => states[m]).join(', ');
    const kind = s.closed[c] ? 'closed' : 'transient';
    const period = s.periods[c]! > 1 ? `, period ${s.periods[c]}` : s.periods[c] === 1 ? ', aperiodic' : '';
    lines.push(`  {${names}} ${kind}${period}`);
  });
  lines.push(`  ${s.irreducible ? 'irreducible: every state can reach every other' : 'not irreducible'}` +
    (s.absorbing.length ? ` · absorbing: ${s.absorbing.map((m) => states[m]).join(', ')}` : ''));
  if (pr.eigenvalues) {
    lines.push(`  eigenvalues (mathjs): ${pr.eigenvalues.map((e) => (Math.abs(e.im) < 1e-12 ? e.re.toFixed(3) : `${e.re.toFixed(3)}${e.im < 0 ? '−' : '+'}${Math.abs(e.im).toFixed(3)}i`)).join(', ')}`);
  }
  lines.push(style.dim('  Structure is that of the MLE; a transition never observed is absent from it but not from the posterior.'));

  section(`How long each state lasts — expected stay 1/(1 − pᵢᵢ), steps: MLE · median [${band}]`);
  const stay = makeTable(['state', 'MLE', `posterior`], style, ['left', 'right', 'right']);
  states.forEach((name, i) => stay.push([name, pointOf(pr.residence[i]!, 'never leaves'), bandText(pr.residence[i]!)]));
  lines.push(stay.toString());

  if (pr.passage) {
    section(`Mean first passage, steps for one site, from → to (recurrence time on the diagonal) — median [${band}]`);
    const t = makeTable(['from → to', ...states], style, ['left', ...states.map(() => 'right' as const)]);
    states.forEach((name, i) => t.push([name, ...states.map((_, j) => bandText(pr.passage![i * k + j]!))]));
    lines.push(t.toString());
    lines.push(style.dim(`  over the ${pr.passage[0]!.draws} of ${settings.draws} draws in which every state can reach every other` +
      (pr.structure.irreducible ? '' : '; the MLE itself is not irreducible, so it has no such times')));
  }

  if (pr.absorption) {
    const a = pr.absorption;
    const classNames = a.closedClasses.map((c) => `{${c.map((m) => states[m]).join(', ')}}`);
    section(`Transient states of the MLE: steps until a closed class is reached, and where sites end up — MLE · median [${band}]`);
    const t = makeTable(['from', 'steps', ...classNames.map((n) => `ends in ${n}`)], style, ['left', 'right', ...classNames.map(() => 'right' as const)]);
    const both = (e: Estimate, digits: number): string => `${fixed(e.point, digits)} · ${bandText(e, digits)}`;
    a.transient.forEach((st, row) => {
      t.push([states[st]!, both(a.steps[row]!, 1), ...classNames.map((_, c) => both(a.ends[row * classNames.length + c]!, 2))]);
    });
    lines.push(t.toString());
    lines.push(style.dim(a.steps[0]!.draws > 0
      ? `  bands over the ${a.steps[0]!.draws} of ${settings.draws} draws with the same transient states`
      : '  no posterior draw has these transient states (a transition never observed keeps some probability), so there is no band: ' +
        'the closed class is closed only in the MLE'));
  }

  section('How fast the mix settles (Caswell 2001, §4.7)');
  if (pr.settling) {
    const t = makeTable(['quantity', 'MLE', `median [${band}]`], style, ['left', 'right', 'right']);
    t.push(['|λ₂|, second-largest eigenvalue modulus', fixed(pr.settling.slem.point, 3), bandText(pr.settling.slem, 3)]);
    t.push(['damping ratio 1/|λ₂|', fixed(pr.settling.damping.point, 2), bandText(pr.settling.damping, 2)]);
    t.push([`steps from the ${fit.latest.time} mix to within 5% of the long-run mix`, fixed(pr.settling.steps.point, 0), bandText(pr.settling.steps, 0)]);
    lines.push(t.toString());
  } else {
    lines.push(style.yellow('  the fitted chain has more than one closed class: no single long-run mix to settle to'));
  }

  section('What the forecast hinges on — transitions ranked by their effect at the posterior mean, rows kept stochastic');
  if (pr.sensitivity.length > 0) {
    const target = settings.target;
    const rank = (x: typeof pr.sensitivity[number]): number =>
      target ? Math.abs(x.horizon ?? 0) : x.stationary.reduce((a, b) => a + Math.abs(b), 0) / 2;
    const top = [...pr.sensitivity].sort((a, b) => rank(b) - rank(a)).slice(0, 10);
    const head = target
      ? ['transition', 'p (posterior mean)', `long-run ${states[target.state]}`, `${states[target.state]} in ${fit.latest.time + target.steps * fit.step}`]
      : ['transition', 'p (posterior mean)', 'long-run mix moved', 'largest change'];
    const t = makeTable(head, style, ['left', 'right', 'right', 'right']);
    for (const x of top) {
      const name = `${states[x.from]} → ${states[x.to]}`;
      if (target) {
        t.push([name, x.probability.toFixed(3), points(x.stationary[target.state]!), points(x.horizon ?? 0)]);
      } else {
        const biggest = x.stationary.reduce((best, v, i) => (Math.abs(v) > Math.abs(x.stationary[best]!) ? i : best), 0);
        t.push([name, x.probability.toFixed(3), points(rank(x)).replace('+', ''), `${states[biggest]} ${points(x.stationary[biggest]!)}`]);
      }
    }
    lines.push(t.toString());
    lines.push(style.dim('  change in percentage points for each +1 point in the transition probability (taken from the rest of its row); ' +
      'Schweitzer 1968; Cho & Meyer 2000; Caswell 2001 ch. 9.'));
  } else {
    lines.push(style.yellow('  no unique long-run mix: sensitivities are not defined'));
  }
  const zones = fit.zones;
  if (zones?.sampler) {
    lines.push('', style.bold(`Zones (column ${zones.column}), partially pooled`));
    lines.push(zoneSamplerLine(zones.sampler, states, zones.zones.map((z) => z.name)));
    for (const w of zoneSamplerWarnings(zones.sampler, states, zones.zones.map((z) => z.name))) lines.push(style.yellow(`warning: ${w.line}`));
  }
  return lines.join('\n') + '\n';
}

const VARIATION_NOTE = {
  estimated: '', given: '', 'one-cell': 'does not vary: one possible transition', 'never-left': 'does not vary: never seen to leave',
  'few-counts': 'does not vary: fewer than 3 periods with two or more transitions', 'no-periods': 'no per-period counts in the fit file',
} as const;


function testTable(reports: readonly TestReport[], style: ChalkInstance): string {
  const t = makeTable(['test', 'G²', 'X²', 'df', 'p (G²)', 'p (X²)', 'p (sim.)', 'expected < 5'], style,
    ['left', 'right', 'right', 'right', 'right', 'right', 'right', 'right']);
  for (const r of reports) {
    t.push([r.name, r.g2.toFixed(2), r.x2.toFixed(2), String(r.df), pValue(r.pG2), pValue(r.pX2),
      r.pBootstrap === null ? '—' : pValue(r.pBootstrap),
      `${percent(r.cells ? r.smallCells / r.cells : 0)}%${r.sparse ? ' (sparse)' : ''}`]);
  }
  return t.toString() + '\n' + reports.map((r) => style.dim(`  ${r.name}: small p means ${r.meaning}`)).join('\n');
}

function pValue(p: number): string {
  if (p >= 0.001) return p.toFixed(3);
  return p === 0 ? '< 1e-300' : p.toExponential(1);
}

function fixed(x: number | null, digits: number): string {
  return x === null ? '—' : x.toFixed(digits);
}

function pointOf(e: Estimate, none: string): string {
  return e.point === null ? none : e.point.toFixed(1);
}

function bandText(e: Estimate, digits = 1): string {
  if (e.draws === 0) return '—';
  const f = (x: number): string => x.toFixed(digits);
  return f(e.low) === f(e.high) ? f(e.median) : `${f(e.median)} [${f(e.low)}–${f(e.high)}]`;
}

/** A derivative of a share per unit probability, as percentage points per point: the same number. */
function points(x: number): string {
  const v = x.toFixed(2);
  return x > 0 ? `+${v}` : v.replace('-', '−');
}
