import type { ChalkInstance } from 'chalk';
import { siteCount, type Fit, type SeasonRounding } from '../fit/fit.js';
import type { FitEstimates } from '../fit/estimate.js';
import { pseudoCount } from '../chain/prior.js';
import { count, fitSites, latestCoverage, levelLabel, percent, probability, probabilityBand } from './numbers.js';
import { makeTable } from './style.js';
import { carriedWords } from './forecast-table.js';
import type { PriorReliance } from '../chain/prior-reliance.js';
import { priorSensitivityLines } from './prior-sensitivity.js';
import { blockNotes } from '../fit/spatial-blocks.js';
import { errorModelLines } from './error-table.js';
import { settingName } from '../setting-name.js';

/**
 * What the fit left out, merged or could not use: skipped pairs (old fit files only), sites with one
 * survey, repeated rows (also printed by sere season).
 */
export function dataWarnings(fit: Fit, style: ChalkInstance): string[] {
  const lines = fit.skipped.map(({ gap, pairs }) =>
    style.yellow(`skipped: ${count(pairs, 'pair')} of consecutive surveys ${gap} years apart (not one step)`));
  if ((fit.singleSurveySites ?? 0) > 0) {
    lines.push(style.yellow(`${count(fit.singleSurveySites!, 'site')} surveyed once only: no pair, so no information about change ` +
      '(they count in the latest mix when surveyed then)'));
  }
  if (fit.repeatedRows > 0) lines.push(style.yellow(`repeated rows: ${fit.repeatedRows} exact duplicates, each used once`));
  if (fit.labels && fit.labels.droppedRows > 0) {
    lines.push(style.yellow(`label map ${fit.labels.file}: ${count(fit.labels.droppedRows, 'survey')} left out (labels mapped to skip)`));
  }
  for (const t of fit.typos ?? []) {
    // The label map is where a recorded spelling is fixed without editing the field data.
    const map = fit.labels ? `in the label map ${fit.labels.file}` : 'in a label map (--labels FILE, or fit.labels in a scenario)';
    lines.push(style.yellow(`check state '${t.label}' (${count(t.rows, 'row')}, first on line ${t.line}): a slip for '${t.near}' ` +
      `(${count(t.nearRows, 'row')})? Map '${t.label}: ${t.near}' ${map}, or declare the states with ${settingName('--states', 'fit.states')} if both are real`));
  }
  return lines;
}

/** The terminal report of `sere fit`: the data, the counts, the estimates, flags and the stationary mix. */
export function fitTable(fit: Fit, est: FitEstimates, style: ChalkInstance,
  priorSensitivity: readonly { readonly reliance: PriorReliance; readonly longRun: readonly (number | null)[] }[] = []): string {
  const { states } = fit;
  const k = states.length;
  const lines: string[] = [];
  const matrix = (title: string, cell: (c: number) => string): void => {
    lines.push('', style.bold(title));
    const table = makeTable(['from → to', ...states], style, ['left', ...states.map(() => 'right' as const)]);
    states.forEach((name, i) => table.push([name, ...states.map((_, j) => cell(i * k + j))]));
    lines.push(table.toString());
  };

  lines.push(style.bold(`Fit of ${fit.input.file}`));
  lines.push(`${fitSites(fit)} · ${count(fit.surveys, 'survey')} (${fit.firstTime}–${fit.latest.time}) · ` +
    `${count(fit.transitions, 'transition')} of one ${fit.step}-year step`);
  const further = (fit.pairsByGap ?? []).filter((p) => p.gap > 1);
  if (further.length > 0) {
    lines.push(`pairs further apart, all used: ${further.map((p) => `${count(p.pairs, 'pair')} ${p.gap} steps apart`).join(', ')} · ` +
      `maximum likelihood by EM (${count(est.mle.iterations, 'iteration')}${est.mle.converged ? '' : ', not converged'})`);
  }
  if (fit.seasons) lines.push(seasonLine(fit.seasons));
  if (fit.spatial) {
    const [what, few] = blockNotes(fit.spatial, fit.blockSites ? ' pixels' : '');
    lines.push(what!.replace('spatial block bootstrap', 'the bootstrap resamples spatial blocks'));
    if (few) lines.push(style.yellow(few));
  }
  lines.push(...dataWarnings(fit, style));
  lines.push(`prior: ${typeof fit.prior === 'number' ? 'pseudo-count' : fit.prior} (${pseudoCount(fit.prior)} per possible transition)` +
    (fit.impossible.length ? ` · impossible: ${fit.impossible.map(([a, b]) => `${a}>${b}`).join(', ')}` : ''));

  const impossible = new Set(fit.impossible.map(([a, b]) => states.indexOf(a) * k + states.indexOf(b)));
  matrix(fit.errorModel ? 'Recorded transition counts (as recorded, before observer error is allowed for), from → to' : 'Transition counts, from → to', (c) => String(fit.counts[c]));
  if (further.length > 0 || fit.errorModel) {
    matrix(fit.errorModel ? 'Completed counts at the MLE (expected true transitions), from → to' : 'Completed counts at the MLE (one-step + expected inside longer gaps), from → to', (c) => est.mle.expected[c]!.toFixed(1));
  }
  matrix('Maximum-likelihood probabilities, from → to', (c) => impossible.has(c) ? '—' : probability(est.mle.p[c]!));
  const { posterior } = est;
  const sample = fit.latentSample;
  if (sample) {
    const rhat = Array.from(sample.rhat).filter(Number.isFinite);
    const ess = Array.from(sample.ess).filter(Number.isFinite);
    lines.push('', `posterior by data augmentation over ${fit.errorModel ? 'the true paths behind the records' : 'the unsurveyed steps'}: ${count(sample.chains, 'chain')} × ${sample.retained / sample.chains} sweeps kept${sample.thin > 1 ? ` (every ${sample.thin === 2 ? 'second' : `${sample.thin}th`})` : ''} ` +
      `after ${sample.warmUp} warm-up (seed ${sample.seed}) · ` +
      (rhat.length ? `largest R̂ ${Math.max(...rhat).toFixed(3)} · smallest effective sample size ${Math.round(Math.min(...ess))}` : 'no diagnostics (they need two chains or more)'));
  }
  matrix(`Posterior mean [${levelLabel(posterior.level)}], from → to`, (c) =>
    impossible.has(c) ? '—' : probabilityBand(posterior.mean[c]!, posterior.low[c]!, posterior.high[c]!));
  if (impossible.size > 0) lines.push(style.dim('— declared impossible: zero in every draw'));

  for (const i of est.mle.rowsFromPrior) {
    lines.push(style.yellow(`flag: '${states[i]}' was never surveyed as a from-state; its row comes from the prior alone`));
  }
  for (const i of est.mle.rowsNeverLeft) {
    lines.push(style.yellow(`flag: '${states[i]}' was never seen to leave; the MLE makes it absorbing, the posterior does not`));
  }

  lines.push('', style.bold('Stationary (long-run) mix of the MLE'));
  if (est.stationary.unique) {
    const mix = est.stationary.mix;
    lines.push(states.map((name, s) => `${name} ${percent(mix[s]!)}%`).join(' · '));
  } else {
    const classes = est.stationary.closedClasses.map((c) => `{${c.map((s) => states[s]).join(', ')}}`).join(', ');
    lines.push(style.yellow(`no single long-run mix: the chain has ${est.stationary.closedClasses.length} closed classes ${classes}`));
  }
  if (priorSensitivity.length > 0) {
    lines.push('', ...priorSensitivityLines(states, priorSensitivity.map((p) => ({ reliance: p.reliance, columns: [p.longRun] })),
      ['long-run share'], style));
  }
  lines.push(...errorModelLines(fit, est, style));
  lines.push('', style.bold(`Latest ${fit.errorModel ? 'recorded' : 'surveyed'} mix (${fit.latest.time}, ${latestCoverage(fit.latest.sites, siteCount(fit))})`));
  if (fit.errorModel) lines.push('forecasts start from the true mix above, not from this one');
  else if (fit.latest.carried?.length) lines.push(`forecasts start from these ${count(fit.latest.sites, 'site')} ${carriedWords(fit.latest.carried)}`);
  // Sites neither surveyed at the latest time nor carried (nor left out for an uneven gap): a counts
  // table written before it had last-survey rows (data/counts-table.ts) cannot place them.
  const accounted = fit.latest.sites + (fit.latest.carried ?? []).reduce((s, c) => s + c.sites, 0) + (fit.latest.notCarried ?? 0);
  const uncarried = fit.pooledSites === undefined ? 0 : fit.pooledSites - accounted;
  if (uncarried > 0) {
    lines.push(style.yellow(`${count(uncarried, 'site')} not surveyed in ${fit.latest.time} left out of the start: these pooled counts have no last-survey rows to carry them forward (count the survey table again with this version of sere count)`));
  }
  if (fit.latest.notCarried) lines.push(style.yellow(`${count(fit.latest.notCarried, 'site')} last surveyed a time that is not whole steps before ${fit.latest.time}: left out of the start`));
  lines.push(states.map((name, s) => `${name} ${percent(fit.latest.shares[s]!)}%`).join(' · '));
  return lines.join('\n') + '\n';
}

/** How dated surveys were rounded to yearly seasons, in one line. */
export function seasonLine(s: SeasonRounding): string {
  return `dates rounded to yearly seasons centred on ${s.centre} (month-day): the largest shift ${s.largestShiftDays} days (line ${s.largestShiftLine}); ` +
    `${count(s.otherYear, 'survey')} of ${s.dates} counted in the season of a neighbouring calendar year`;
}
