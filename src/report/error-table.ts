import type { ChalkInstance } from 'chalk';
import { trueShares } from '../chain/latest-mix.js';
import type { ErrorEstimate } from '../chain/error-em.js';
import type { FitEstimates } from '../fit/estimate.js';
import type { Fit } from '../fit/fit.js';
import type { ObserverMatrices } from '../fit/error-model.js';
import { count, levelLabel, percent, probability } from './numbers.js';
import { makeTable } from './style.js';

/** `sere fit`'s lines on observer error: the assessment, the error matrix at the MLE, and the true latest mix forecasts start from. */
export function errorModelLines(fit: Fit, est: FitEstimates, style: ChalkInstance): string[] {
  const model = fit.errorModel;
  if (!model) return [];
  const { states } = fit;
  const k = states.length;
  const assessed = model.assessment.reduce((a, b) => a + b, 0);
  const mle = est.mle as ErrorEstimate;
  const lines = ['', style.bold(`Observer error: error matrix ${model.file} (${count(assessed, 'assessed site')})`),
    `the chain is fitted to the true states behind the records (EM, ${count(mle.iterations, 'iteration')}${mle.converged ? '' : ', not converged'}); ` +
    'an error the assessment never saw is taken as impossible'];
  const matrixTable = (m: number): string => {
    const table = makeTable(['true → recorded', ...states], style, ['left', ...states.map(() => 'right' as const)]);
    states.forEach((name, x) => table.push([name, ...states.map((_, r) => (model.assessment[x * k + r]! > 0 ? probability(mle.emission[m * k * k + x * k + r]!) : '—'))]));
    return table.toString();
  };
  const observers = model.observers;
  lines.push('', style.bold(`${observers ? 'Pooled error matrix (every assessed observer)' : 'Error matrix'} at the MLE, P(recorded | true), true → recorded`), matrixTable(0));
  if (observers) {
    observers.names.forEach((name, o) => {
      const assessedSites = observers.assessments.subarray(o * k * k, (o + 1) * k * k).reduce((a, b) => a + b, 0);
      lines.push('', style.bold(`Error matrix of observer ${name} (${count(assessedSites, 'assessed site')}) at the MLE, true → recorded`), matrixTable(1 + o));
    });
    lines.push(...observerNotes(observers));
  }
  const sweeps = fit.latentSample?.errors;
  if (sweeps) {
    const retained = fit.latentSample!.retained;
    const shares = new Float64Array(retained * k);
    for (let r = 0; r < retained; r++) trueShares(sweeps.latest, r, k, shares, r * k);
    const band = (x: number): string => {
      const column = Array.from({ length: retained }, (_, r) => shares[r * k + x]!).sort((a, b) => a - b);
      const at = (q: number): number => column[Math.min(retained - 1, Math.floor(q * retained))]!;
      const tail = (1 - est.posterior.level) / 2;
      return `${states[x]} ${percent(column.reduce((a, b) => a + b, 0) / retained)}% [${percent(at(tail))}–${percent(at(1 - tail))}]`;
    };
    lines.push('', style.bold(`True mix at ${fit.latest.time}, where forecasts start (posterior mean [${levelLabel(est.posterior.level)}])`),
      states.map((_, x) => band(x)).join(' · '));
  }
  return lines;
}

/** The warning for surveyed observers the assessment does not name, and the note for assessed observers who made no survey. */
export function observerNotes(observers: ObserverMatrices): string[] {
  const lines: string[] = [];
  if (observers.unassessed.length > 0) {
    lines.push(`warning: ${observers.unassessed.length === 1 ? 'observer' : 'observers'} ${observers.unassessed.join(', ')} ${observers.unassessed.length === 1 ? 'is' : 'are'} not in the error matrix: ` +
      `their ${count(observers.pooledSurveys, 'survey')} ${observers.pooledSurveys === 1 ? 'is' : 'are'} read through the pooled matrix (add their assessment to give them their own)`);
  }
  if (observers.notSurveyed.length > 0) {
    lines.push(`note: ${observers.notSurveyed.join(', ')} ${observers.notSurveyed.length === 1 ? 'is' : 'are'} assessed but made no survey here: ${observers.notSurveyed.length === 1 ? 'that matrix rests' : 'those matrices rest'} on the assessment alone`);
  }
  return lines;
}
