import { describe, expect, it } from 'vitest';
import { randomStreams } from '../../src/uncertainty/random.js';
import { projectDraws, projectDrawsTogether, projectionState, MOST_COMMON_TOLERANCE, type ProjectionInputs } from '../../src/engine/project-chunk.js';
import { yearStreamKeys } from '../../src/engine/year-matrix.js';
import { targetBounds } from '../../src/engine/target.js';
import { yearKernel } from '../../src/uncertainty/year-kernel.js';
import type { LandscapeTarget } from '../../src/scenario/scenario.js';

/** D random row-stochastic k × k matrices, with zeros (so mixes get exact zeros and ties). */
function draws(D: number, k: number, seed: number): Float64Array {
  const r = randomStreams(seed).stream('project-tracked');
  const P = new Float64Array(D * k * k);
  for (let d = 0; d < D; d++) {
    for (let i = 0; i < k; i++) {
      const at = (d * k + i) * k;
      let sum = 0;
      for (let j = 0; j < k; j++) { const w = r.uniform() < 0.3 ? 0 : r.uniform(); P[at + j] = w; sum += w; }
      if (sum === 0) { P[at + i] = 1; sum = 1; }
      for (let j = 0; j < k; j++) P[at + j]! /= sum;
    }
  }
  return P;
}

/**
 * The plain projection and its tracking as the JavaScript projector did it before it moved to
 * WebAssembly (project-chunk.ts before this change), all steps in one pass: the reference.
 */
function reference(inputs: ProjectionInputs, record: readonly number[]) {
  const { P, k, draws: D, horizon, start, startByDraw, target } = inputs;
  const { low, high } = target ? targetBounds(target) : { low: 0, high: 0 };
  const out = new Float64Array(record.length * k * D);
  const firstMostCommon = new Int32Array(D * k).fill(-1);
  const firstAtTarget = new Int32Array(D).fill(-1);
  const targetRunAtHorizon = new Int32Array(D);
  const x = new Float64Array(k);
  const y = new Float64Array(k);
  for (let d = 0; d < D; d++) {
    const so = startByDraw ? d * k : 0;
    for (let s = 0; s < k; s++) x[s] = start[so + s]!;
    let run = -1;
    for (let t = 0; t <= horizon; t++) {
      if (t > 0) {
        const base = d * k * k;
        for (let j = 0; j < k; j++) y[j] = x[0]! * P[base + j]!;
        for (let i = 1; i < k; i++) { const xi = x[i]!; if (xi === 0) continue; for (let j = 0; j < k; j++) y[j] += xi * P[base + i * k + j]!; }
        x.set(y);
      }
      const r = record.indexOf(t);
      if (r >= 0) for (let s = 0; s < k; s++) out[(r * k + s) * D + d] = x[s]!;
      let largest = 0;
      for (let s = 0; s < k; s++) if (x[s]! > largest) largest = x[s]!;
      for (let s = 0; s < k; s++) if (firstMostCommon[d * k + s] === -1 && x[s]! >= largest - MOST_COMMON_TOLERANCE) firstMostCommon[d * k + s] = t;
      if (target) {
        let sum = 0;
        for (const s of target.states) sum += x[s]!;
        if (!(sum >= low && sum <= high)) run = -1;
        else {
          if (run < 0) run = t;
          if (firstAtTarget[d] === -1 && t - run + 1 >= target.staysMet) firstAtTarget[d] = run;
        }
      }
    }
    if (run >= 0) targetRunAtHorizon[d] = horizon - run + 1;
  }
  return { out, firstMostCommon, firstAtTarget, targetRunAtHorizon };
}

describe('the plain projection in WebAssembly (projectTracked, through projectDraws)', () => {
  it('gives the bits and first steps of the JavaScript projector, cut into chunks of years and blocks of draws, for k = 1 … 7 and 12', () => {
    const horizon = 40;
    const record = [0, 1, 5, 6, 7, 19, 20, 33, 40];
    for (const k of [1, 2, 3, 4, 5, 6, 7, 12]) {
      for (const startByDraw of [false, true]) {
        const D = 600; // three blocks of the kernel's 256 draws, the last one short
        const P = draws(D, k, 10 * k + (startByDraw ? 1 : 0));
        const mix = Float64Array.from({ length: k }, (_, s) => (s === 0 ? 0 : 1 / Math.max(1, k - 1)));
        if (k === 1) mix[0] = 1;
        const start = startByDraw ? Float64Array.from({ length: D * k }, (_, c) => mix[(c + Math.floor(c / k)) % k]!) : mix;
        const target: LandscapeTarget = { states: k > 2 ? [k - 1, 1] : [0], bound: 'at-least', threshold: k > 4 ? 2.2 / k : k > 2 ? 0.45 : 0.5, staysMet: 3 };
        const inputs: ProjectionInputs = { P, k, draws: D, horizon, start, startByDraw, hits: [], target };
        const want = reference(inputs, record);
        // Chunks of years as simulate.ts cuts them (at most 4 recorded steps each), each a pass over the blocks of draws.
        const state = projectionState(D, k, 1);
        const got = new Float64Array(record.length * k * D);
        for (let c = 0, from = 0; c < record.length; c += 4) {
          const kept = record.slice(c, c + 4);
          const to = c + 4 >= record.length ? horizon + 1 : kept[kept.length - 1]! + 1;
          const slotOf = new Int32Array(horizon + 1).fill(-1);
          kept.forEach((t, r) => { slotOf[t] = r; });
          const buffer = new Float64Array(kept.length * k * D);
          for (const [d0, d1] of [[0, 100], [100, 513], [513, D]] as const) projectDraws(inputs, state, d0, d1, from, to, slotOf, buffer);
          got.set(buffer, c * k * D);
          from = to;
        }
        expect(Array.from(got)).toEqual(Array.from(want.out));
        expect(Array.from(state.firstMostCommon)).toEqual(Array.from(want.firstMostCommon));
        expect(Array.from(state.firstAtTarget)).toEqual(Array.from(want.firstAtTarget));
        expect(Array.from(state.targetRunAtHorizon)).toEqual(Array.from(want.targetRunAtHorizon));
        // The target is met in some draws and not in others, so both branches are exercised.
        const met = want.firstAtTarget.filter((t) => t >= 0).length;
        if (k > 1) expect(met > 0 && met < D).toBe(true);
      }
    }
  });

  it('with year matrices, run alone (WebAssembly) gives the bits and first steps it gives beside another run (the JavaScript projector)', () => {
    const horizon = 25;
    for (const k of [2, 5]) {
      const D = 1300; // across a block of draws' year streams (1,024) and the kernel's 256-draw calls
      const P = draws(D, k, 70 + k);
      const concentration = Float64Array.from({ length: D * k }, (_, c) => (c % k === k - 1 ? Infinity : 5 + (c % 7)));
      const variation = { concentration, keys: yearStreamKeys(randomStreams(9).stream('years'), D, horizon) };
      const start = Float64Array.from({ length: k }, (_, s) => (s + 1) / ((k * (k + 1)) / 2));
      const target: LandscapeTarget = { states: [k - 1], bound: 'at-least', threshold: 0.5, staysMet: 2 };
      const inputs: ProjectionInputs = { P, k, draws: D, horizon, start, hits: [], target, variation };
      const run = () => ({ inputs, state: projectionState(D, k, 1), out: new Float64Array(3 * k * D) });
      const alone = run();
      const pair = [run(), run()];
      for (const [from, to, kept] of [[0, 8, [0, 7]], [8, horizon + 1, [horizon]]] as const) {
        const slotOf = new Int32Array(horizon + 1).fill(-1);
        kept.forEach((t, r) => { slotOf[t] = r; });
        for (const [d0, d1] of [[0, 1024], [1024, D]] as const) {
          projectDrawsTogether([alone], d0, d1, from, to, slotOf);
          projectDrawsTogether(pair, d0, d1, from, to, slotOf);
        }
        expect(Array.from(alone.out)).toEqual(Array.from(pair[0]!.out));
      }
      for (const key of ['xs', 'firstMostCommon', 'firstAtTarget', 'targetRunAtHorizon'] as const) {
        expect(Array.from(alone.state[key])).toEqual(Array.from(pair[0]!.state[key]));
      }
      const met = alone.state.firstAtTarget.filter((t) => t >= 0).length;
      expect(met > 0 && met < D).toBe(true);
    }
  });

  it('makes a year kernel made before it refuse to run once it has taken more of the memory (no silently empty views)', () => {
    const k = 3;
    const kernel = yearKernel(k, 1, 1);
    const D = 256;
    const big = 30; // a kernel area larger than any before in this thread
    const P = draws(D, big, 4);
    const inputs: ProjectionInputs = { P, k: big, draws: D, horizon: 200, start: Float64Array.from({ length: big }, () => 1 / big), hits: [] };
    const slotOf = Int32Array.from({ length: 201 }, (_, t) => t);
    projectDraws(inputs, projectionState(D, big, 1), 0, D, 0, 201, slotOf, new Float64Array(201 * big * D));
    expect(() => kernel.sample(0, 0)).toThrow();
  });
});
