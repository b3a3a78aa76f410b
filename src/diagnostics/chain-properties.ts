import { posteriorMean } from '../chain/estimates.js';
import { absorption, fundamentalMatrix, meanFirstPassage, type Absorption } from '../chain/fundamental.js';
import { transitionSensitivities, type TransitionSensitivity } from '../chain/sensitivity.js';
import { stepsToSettle } from '../chain/settling.js';
import { dampingRatio, eigenvalues, secondEigenvalueModulus, type Eigenvalue } from '../chain/spectral.js';
import { stationaryGivenClasses } from '../chain/stationary.js';
import { chainStructure, type ChainStructure } from '../chain/structure.js';
import { fitMask, fitMle, fitPrior, type Fit } from '../fit/fit.js';
import { bandOf, type Band } from '../engine/quantiles.js';
import type { MatrixDraws } from '../uncertainty/draws.js';

/** A point estimate (from the MLE) with its credible band over the draws where it is defined. */
export interface Estimate extends Band {
  readonly point: number | null;
  /** Draws in which the quantity exists (e.g. irreducible draws, for passage times). */
  readonly draws: number;
}

export interface ChainProperties {
  readonly structure: ChainStructure;
  readonly eigenvalues: Eigenvalue[] | null;
  /** Per state: expected stay, 1/(1 − pᵢᵢ) steps. */
  readonly residence: Estimate[];
  /** Ergodic chains: k×k mean first passage times, recurrence times on the diagonal. */
  readonly passage: Estimate[] | null;
  /** Chains with transient states: steps to reach a closed class, and where sites end. */
  readonly absorption: {
    readonly transient: readonly number[];
    readonly closedClasses: readonly (readonly number[])[];
    /** The MLE's fundamental matrix N = (I − Q)⁻¹ over the transient states. */
    readonly fundamental: Float64Array;
    readonly steps: Estimate[];
    readonly ends: Estimate[];
  } | null;
  readonly settling: { readonly slem: Estimate; readonly damping: Estimate; readonly steps: Estimate } | null;
  readonly sensitivity: readonly TransitionSensitivity[];
}

/**
 * Structure, passage times, speed of settling and sensitivities of the fitted chain — each as the
 * MLE's value with a credible band from posterior draws. Structural properties come from the MLE;
 * a band is taken over the draws that share what the quantity needs (a unique stationary mix,
 * irreducibility, the same transient states), and their number is reported.
 */
export function chainProperties(fit: Fit, matrices: MatrixDraws, level: number,
  target?: { readonly state: number; readonly steps: number }): ChainProperties {
  const k = fit.states.length;
  const mle = fitMle(fit).p;
  const structure = chainStructure(mle, k);
  const stationaryOf = (p: Float64Array, offset: number): Float64Array | null => {
    const s = p === mle ? structure : chainStructure(p, k, offset);
    const r = stationaryGivenClasses(p, k, offset, s);
    return r.unique ? r.mix : null;
  };
  const D = matrices.count;
  const K2 = k * k;
  const start = fit.latest.shares;

  const residence = Array.from({ length: k }, (_, s) => estimate(
    1 / (1 - mle[s * k + s]!), D, (d) => 1 / (1 - matrices.data[d * K2 + s * k + s]!), level));

  const piMle = stationaryOf(mle, 0);
  // Each draw's structure once, for the stationary mix, passage times and absorption alike.
  const structures = Array.from({ length: D }, (_, d) => chainStructure(matrices.data, k, d * K2));
  // Per draw once: stationary mix, and for irreducible draws Z and M. Posterior draws give every
  // possible transition some probability, so they are often irreducible where the MLE is not.
  const perDraw = Array.from({ length: D }, (_, d) => {
    const offset = d * K2;
    const s = structures[d]!;
    const r = stationaryGivenClasses(matrices.data, k, offset, s);
    if (!r.unique) return null;
    const m = s.irreducible ? meanFirstPassage(fundamentalMatrix(matrices.data, k, r.mix, offset), k, r.mix) : null;
    const slem = secondEigenvalueModulus(matrices.data, k, r.mix, offset);
    const steps = stepsToSettle(matrices.data, k, start, r.mix, offset);
    return { m, slem, steps };
  });
  let passage: Estimate[] | null = null;
  if (structure.irreducible || perDraw.some((x) => x?.m)) {
    const mMle = structure.irreducible && piMle ? meanFirstPassage(fundamentalMatrix(mle, k, piMle), k, piMle) : null;
    passage = Array.from({ length: K2 }, (_, c) => estimate(mMle ? mMle[c]! : null, D, (d) => perDraw[d]?.m?.[c] ?? null, level));
  }
  let settling: ChainProperties['settling'] = null;
  if (piMle || perDraw.some((x) => x !== null)) {
    const slemMle = piMle ? secondEigenvalueModulus(mle, k, piMle) : null;
    settling = {
      slem: estimate(slemMle, D, (d) => perDraw[d]?.slem ?? null, level),
      damping: estimate(slemMle === null ? null : dampingRatio(slemMle), D, (d) => (perDraw[d] ? dampingRatio(perDraw[d]!.slem) : null), level),
      steps: estimate(piMle ? stepsToSettle(mle, k, start, piMle) : null, D, (d) => perDraw[d]?.steps ?? null, level),
    };
  }

  let absorbed: ChainProperties['absorption'] = null;
  const aMle = absorption(mle, k, structure);
  if (aMle) {
    // Only draws with the MLE's transient states and closed classes are comparable; check that
    // before inverting anything.
    const key = JSON.stringify([aMle.transient, aMle.closedClasses]);
    const perDraw: (Absorption | null)[] = structures.map((s, d) => {
      const closed = s.classes.filter((_, c) => s.closed[c]);
      return JSON.stringify([s.transient, closed]) === key ? absorption(matrices.data, k, s, d * K2) : null;
    });
    const C = aMle.closedClasses.length;
    absorbed = {
      transient: aMle.transient,
      closedClasses: aMle.closedClasses,
      fundamental: aMle.n,
      steps: aMle.transient.map((_, a) => estimate(aMle.steps[a]!, D, (d) => perDraw[d]?.steps[a] ?? null, level)),
      ends: Array.from({ length: aMle.transient.length * C }, (_, c) => estimate(aMle.b[c]!, D, (d) => perDraw[d]?.b[c] ?? null, level)),
    };
  }

  // Sensitivities at the posterior mean, the matrix the forecasts' draws centre on: unlike the MLE
  // it gives every possible transition some probability, so a state never seen to leave does not
  // make every other state's long-run share (and its sensitivity) zero.
  const mean = posteriorMean(fit.counts, fitPrior(fit), k);
  const piMean = stationaryOf(mean, 0);
  const sensitivity = piMean
    ? transitionSensitivities(mean, k, piMean, fundamentalMatrix(mean, k, piMean),
      fitMask(fit),
      target ? { start, steps: target.steps, target: target.state } : undefined)
    : [];
  return { structure, eigenvalues: eigenvalues(mle, k), residence, passage, absorption: absorbed, settling, sensitivity };
}

/** The point value and the band over draws where `value` is defined (finite). */
function estimate(point: number | null, draws: number, value: (d: number) => number | null, level: number): Estimate {
  const sample: number[] = [];
  for (let d = 0; d < draws; d++) {
    const v = value(d);
    if (v !== null && Number.isFinite(v)) sample.push(v);
  }
  const p = point !== null && Number.isFinite(point) ? point : null;
  if (sample.length === 0) return { point: p, median: NaN, low: NaN, high: NaN, draws: 0 };
  const band = bandOf(Float64Array.from(sample), level);
  return { point: p, median: band.median, low: band.low, high: band.high, draws: sample.length };
}
