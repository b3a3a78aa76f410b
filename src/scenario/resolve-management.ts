import { SereError, type ErrorCode, type Place } from '../errors.js';
import type { KeyPath } from '../data/read-structured.js';
import type { RowChange } from '../chain/row-change.js';
import type { EventFile, TreatmentFile } from './schema.js';
import type { Disturbance, Treatment } from './scenario.js';

/** An event's given rows must sum to 1 within this (absolute); they are typed by hand. */
export const EVENT_ROW_TOLERANCE = 1e-9;

/** Partial-area parcels are tracked as 2^P sub-populations; beyond this the run would crawl. */
export const MAX_PARCELS = 6;

export interface ResolveContext {
  readonly states: readonly string[];
  readonly step: number;
  readonly startYear: number;
  readonly horizonSteps: number;
  /** Row-major k×k: 1 where the fit declares a transition impossible. */
  readonly impossible: Uint8Array;
  stateIndex(name: string, path: KeyPath): number;
  locate(path: KeyPath): Place;
}

function fail(ctx: ResolveContext, code: ErrorCode, what: string, path: KeyPath, hint: string): never {
  throw new SereError(code, what, ctx.locate(path), hint);
}

/** The calendar year each step ends in: step t brings the land from year start+(t−1)·step to start+t·step. */
function stepYear(ctx: ResolveContext, t: number): number {
  return ctx.startYear + t * ctx.step;
}

/**
 * Resolve treatments against the fit: state names, structural zeros, the window and ramp as a
 * strength per step, and parcels. Two `set`s of the same transition that act in the same year
 * conflict (which value would hold?) and are an error; everything else composes in file order.
 */
export function resolveTreatments(ctx: ResolveContext, items: readonly { value: TreatmentFile; path: KeyPath }[]): Treatment[] {
  const treatments = items.map(({ value: t, path }) => {
    const row = ctx.stateIndex(t.state, [...path, 'state']);
    const change = rowChange(ctx, t, row, path);
    const weights = new Float64Array(ctx.horizonSteps + 1);
    const first = t.years?.[0] ?? stepYear(ctx, 1);
    for (let s = 1; s <= ctx.horizonSteps; s++) {
      const year = stepYear(ctx, s);
      if (t.years && (year < t.years[0] || year > t.years[1])) continue;
      // Linear ramp: the first acting step has strength step/ramp, full strength after `ramp` years.
      weights[s] = t.ramp === 0 ? 1 : Math.min(1, (year - first + ctx.step) / t.ramp);
    }
    return { name: t.name, row, change, weights, area: t.area, parcel: t.parcel ?? `treatment:${t.name}`, place: ctx.locate(path) };
  });
  checkSetConflicts(ctx, treatments, items.map((i) => i.path));
  checkParcels(ctx, treatments, items.map((i) => i.path));
  return treatments;
}

function rowChange(ctx: ResolveContext, t: TreatmentFile, row: number, path: KeyPath): RowChange {
  const k = ctx.states.length;
  const impossible = (to: number): boolean => ctx.impossible[row * k + to] === 1;
  if (t.move) {
    const from = ctx.stateIndex(t.move.from, [...path, 'move', 'from']);
    const to = ctx.stateIndex(t.move.to, [...path, 'move', 'to']);
    if (from === to) {
      fail(ctx, 'BAD_SCENARIO', `moves probability from ${t.state}>${t.move.to} to itself, which changes nothing`,
        [...path, 'move', 'to'], 'name another destination state');
    }
    if (impossible(to) && t.move.share > 0) {
      fail(ctx, 'BAD_SCENARIO', `moves probability into ${t.state}>${t.move.to}, which the fit declares impossible`,
        [...path, 'move', 'to'], 'move it to a possible destination, or drop the transition from the impossible list');
    }
    return { kind: 'move', from, to, share: t.move.share };
  }
  const kind = t.multiply ? 'multiply' : 'set';
  const entries = Object.entries((t.multiply ?? t.set)!);
  if (entries.length === 0) fail(ctx, 'BAD_SCENARIO', `${kind} lists no destination`, [...path, kind], `name at least one to-state under ${kind}`);
  const cells = entries.map(([name, value]) => {
    const to = ctx.stateIndex(name, [...path, kind, name]);
    if (impossible(to) && !(kind === 'set' && value === 0)) {
      fail(ctx, 'BAD_SCENARIO', `changes ${t.state}>${name}, which the fit declares impossible`, [...path, kind, name],
        'treat a possible transition, or drop this one from the impossible list');
    }
    return { to, value };
  });
  if (kind === 'set') {
    const total = cells.reduce((a, c) => a + c.value, 0);
    if (total > 1 + EVENT_ROW_TOLERANCE) {
      fail(ctx, 'BAD_SCENARIO', `set probabilities out of '${t.state}' sum to ${total}, above 1`, [...path, 'set'],
        'lower them so they sum to at most 1');
    }
  }
  return { kind, cells };
}

function checkSetConflicts(ctx: ResolveContext, treatments: readonly Treatment[], paths: readonly KeyPath[]): void {
  treatments.forEach((b, n) => {
    const bChange = b.change;
    if (bChange.kind !== 'set') return;
    for (let m = 0; m < n; m++) {
      const a = treatments[m]!;
      const aChange = a.change;
      if (aChange.kind !== 'set' || a.row !== b.row) continue;
      const shared = bChange.cells.find((cb) => aChange.cells.some((ca) => ca.to === cb.to));
      if (!shared) continue;
      const overlap = a.weights.findIndex((w, s) => w > 0 && b.weights[s]! > 0);
      if (overlap < 0) continue;
      const to = ctx.states[shared.to]!;
      fail(ctx, 'BAD_SCENARIO',
        `sets ${ctx.states[b.row]}>${to} in ${stepYear(ctx, overlap)} while treatment '${a.name}' also sets it`,
        [...paths[n]!, 'set', to], 'give the two treatments years that do not overlap, or merge them into one');
    }
  });
}

function checkParcels(ctx: ResolveContext, treatments: readonly Treatment[], paths: readonly KeyPath[]): void {
  const areas = new Map<string, number>();
  treatments.forEach((t, n) => {
    if (t.area === 1) return;
    const known = areas.get(t.parcel);
    if (known !== undefined && known !== t.area) {
      fail(ctx, 'BAD_SCENARIO', `parcel '${t.parcel}' has area ${known} in another treatment but ${t.area} here`,
        [...paths[n]!, 'area'], 'treatments on the same parcel must give the same area');
    }
    areas.set(t.parcel, t.area);
    if (areas.size > MAX_PARCELS) {
      fail(ctx, 'BAD_SCENARIO', `more than ${MAX_PARCELS} separate partial-area parcels`, [...paths[n]!, 'parcel'],
        'let treatments share a parcel (same land) where they can');
    }
  });
}

/** Resolve events: the matrix (rows not given are identity rows), and the chance of a hit per step. */
export function resolveEvents(ctx: ResolveContext, items: readonly { value: EventFile; path: KeyPath }[]): Disturbance[] {
  const k = ctx.states.length;
  return items.map(({ value: e, path }) => {
    const matrix = new Float64Array(k * k);
    for (let i = 0; i < k; i++) matrix[i * k + i] = 1;
    for (const [fromName, row] of Object.entries(e.matrix)) {
      const i = ctx.stateIndex(fromName, [...path, 'matrix', fromName]);
      matrix.fill(0, i * k, i * k + k);
      let total = 0;
      for (const [toName, p] of Object.entries(row)) {
        matrix[i * k + ctx.stateIndex(toName, [...path, 'matrix', fromName, toName])] = p;
        total += p;
      }
      if (Math.abs(total - 1) > EVENT_ROW_TOLERANCE) {
        fail(ctx, 'BAD_MATRIX', `row '${fromName}' of event '${e.name}' sums to ${total}, not 1`, [...path, 'matrix', fromName],
          'give where a hit site in this state ends up, as probabilities summing to 1');
      }
    }
    const yearly = e.chance ?? 1 / e.every!;
    if (yearly > 1) fail(ctx, 'BAD_SCENARIO', `a return interval of ${e.every} years is a chance above 1 per year`, [...path, 'every'],
      'use a return interval of at least 1 year');
    // Per step of `step` years: the chance of at least one hit; a step applies the event once.
    const perStep = 1 - (1 - yearly) ** ctx.step;
    const chances = new Float64Array(ctx.horizonSteps + 1);
    for (let s = 1; s <= ctx.horizonSteps; s++) {
      const year = stepYear(ctx, s);
      if (!e.years || (year >= e.years[0] && year <= e.years[1])) chances[s] = perStep;
    }
    return { name: e.name, scope: e.scope, chances, matrix };
  });
}
