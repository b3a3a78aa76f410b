import { SereError, quote, type Place } from '../errors.js';
import type { KeyPath } from '../data/read-structured.js';
import { siteCount, type Fit } from '../fit/fit.js';
import type { ScenarioZones, Treatment } from './scenario.js';

/** Shares given as numbers must add up to 1 within this (they are typed by hand: 0.6 + 0.4). */
export const AREA_SHARES_TOLERANCE = 1e-6;

/** `410 ha`, `2.5 km2`: a non-negative number and a unit. */
const AREA = /^\s*([0-9]+(?:\.[0-9]+)?(?:e[+-]?[0-9]+)?)\s*(ha|km2|km²|m2|m²|acres?)\s*$/i;

/**
 * The zones of a stratified forecast from a zoned fit and the scenario's `areas`: each zone's share
 * of the area (areas with one unit, shares adding to 1, or by default its share of the plots) and
 * its start (its latest surveyed mix). Undefined for a fit without zones, where `areas` is refused.
 */
export function resolveZones(fit: Fit, areas: Readonly<Record<string, number | string>> | undefined, startGiven: boolean,
  locate: (path: KeyPath) => Place): ScenarioZones | undefined {
  const fail = (what: string, path: KeyPath, hint: string): never => { throw new SereError('BAD_ZONES', what, locate(path), hint); };
  if (!fit.zones) {
    if (areas !== undefined) fail('areas needs a fit that keeps its zones', ['areas'], 'fit with pooling: partial or none (fit.pooling, or sere fit --pooling)');
    return undefined;
  }
  const zones = fit.zones.zones;
  const names = zones.map((z) => z.name);
  if (startGiven) fail('a zoned forecast starts each zone from its own latest survey', ['start'], 'use start: latest, or fit with pooling: complete');
  const latest = zones[0]!.fit.latest.time;
  zones.forEach((z) => {
    if (z.fit.latest.time !== latest) {
      fail(`zone ${quote(z.name)} was last surveyed in ${z.fit.latest.time}, zone ${quote(zones[0]!.name)} in ${latest}: the zones have no common start`, ['data'],
        'survey every zone in the latest season, or fit the zones that were');
    }
  });
  const k = fit.states.length;
  const starts = new Float64Array(names.length * k);
  zones.forEach((z, n) => starts.set(z.fit.latest.shares, n * k));
  const carried = zones.map((z) => (z.fit.latest.carried?.length ? z.fit.latest.carried : undefined));
  if (areas === undefined) {
    const sites = zones.map((z) => siteCount(z.fit));
    const total = sites.reduce((a, b) => a + b, 0);
    return { names, shares: Float64Array.from(sites, (n) => n / total), from: 'plots', starts, carried };
  }
  const given = new Float64Array(names.length).fill(NaN);
  let kind: 'shares' | 'areas' | undefined;
  let unit: string | undefined;
  for (const [name, value] of Object.entries(areas)) {
    const z = names.indexOf(name);
    if (z < 0) fail(`zone ${quote(name)} has no plots in the fit`, ['areas', name], `use one of: ${names.map(quote).join(', ')}`);
    let amount: number;
    let thisKind: 'shares' | 'areas';
    if (typeof value === 'number') {
      amount = value;
      thisKind = 'shares';
    } else {
      const m = AREA.exec(value);
      if (!m) {
        fail(`${quote(value)} is not an area`, ['areas', name], /^\s*-/.test(value) ? 'an area cannot be negative' : 'write a number and a unit (410 ha; ha, km2, m2, acres), or a share (0.6)');
      }
      amount = Number(m![1]);
      thisKind = 'areas';
      const u = m![2]!.toLowerCase().replace('²', '2').replace(/^acre$/, 'acres');
      if (unit !== undefined && u !== unit) fail(`areas mix units: ${unit} and ${u}`, ['areas', name], `give every area in ${unit}`);
      unit = u;
    }
    if (!(amount >= 0) || !Number.isFinite(amount)) fail(`the area of zone ${quote(name)} is ${value}: it cannot be negative`, ['areas', name], 'give an area of 0 or more');
    if (kind !== undefined && thisKind !== kind) {
      fail('areas mix shares (plain numbers) and areas with a unit', ['areas', name], 'give every zone an area with its unit, or every zone a share');
    }
    kind = thisKind;
    given[z] = amount;
  }
  const missing = names.find((_, z) => Number.isNaN(given[z]!));
  if (missing !== undefined) fail(`zone ${quote(missing)} has no area`, ['areas'], 'give every zone of the fit an area (or leave areas out: each zone\'s share of the plots)');
  const total = given.reduce((a, b) => a + b, 0);
  if (!(total > 0)) fail('the areas add up to 0', ['areas'], 'give at least one zone an area above 0');
  if (kind === 'shares' && Math.abs(total - 1) > AREA_SHARES_TOLERANCE) {
    fail(`the shares add up to ${Number(total.toPrecision(12))}, not 1`, ['areas'], 'make the shares add up to 1, or give areas with a unit (410 ha)');
  }
  return { names, shares: Float64Array.from(given, (a) => a / total), from: kind!, ...(kind === 'areas' ? { unit, areas: given } : {}), starts, carried };
}

/** Each zone name of a treatment or event as an index into the zones; a name not among them is refused at its place. */
export function zoneIndices(zones: ScenarioZones | undefined, names: readonly string[] | undefined, path: KeyPath,
  locate: (path: KeyPath) => Place): number[] | undefined {
  if (names === undefined) return undefined;
  if (!zones) throw new SereError('BAD_ZONES', 'zones needs a fit that keeps its zones', locate(path), 'fit with pooling: partial or none, or drop zones');
  return names.map((name, n) => {
    const z = zones.names.indexOf(name);
    if (z < 0) throw new SereError('BAD_ZONES', `unknown zone ${quote(name)}`, locate([...path, n]), `use one of: ${zones.names.map(quote).join(', ')}`);
    return z;
  });
}

/** Treatments on one parcel act on the same land, so they must name the same zones. */
export function checkParcelZones(treatments: readonly Treatment[], paths: readonly KeyPath[], locate: (path: KeyPath) => Place): void {
  const seen = new Map<string, string>();
  treatments.forEach((t, n) => {
    const key = JSON.stringify(t.zones ?? null);
    const known = seen.get(t.parcel);
    if (known !== undefined && known !== key) {
      throw new SereError('BAD_ZONES', `parcel ${quote(t.parcel)} lies in other zones in another treatment`, locate([...paths[n]!, 'zones']),
        'treatments on the same parcel must name the same zones');
    }
    seen.set(t.parcel, key);
  });
}
