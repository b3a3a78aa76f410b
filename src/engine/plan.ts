import type { Disturbance, Scenario, Treatment } from '../scenario/scenario.js';

/**
 * A sub-population of the landscape: the land inside one combination of partial-area parcels.
 * Parcels are placed independently of each other, so a combination's share of the area is the
 * product of each parcel's area (inside) or 1 − area (outside).
 */
export interface SubPopulation {
  readonly weight: number;
  /** Bit p set: this land lies inside parcel p. */
  readonly mask: number;
  /** The zone it lies in (0 without zones): which zone's matrix draws and starting mix it takes. */
  readonly zone: number;
}

/** One distinct recipe for a year's matrix: which changes at which strength, which site events. */
export interface Plan {
  /** The zone whose drawn matrix the recipe starts from. */
  readonly zone: number;
  readonly changes: readonly { readonly treatment: number; readonly weight: number }[];
  readonly siteEvents: readonly { readonly event: number; readonly chance: number }[];
}

/**
 * How every year of a scenario is run, worked out once (independent of the draws): the
 * sub-populations, the distinct year recipes, and which recipe each sub-population uses each step.
 */
export interface RunPlan {
  readonly k: number;
  readonly horizon: number;
  readonly subPopulations: readonly SubPopulation[];
  readonly plans: readonly Plan[];
  /** `planOf[t*G + g]`: recipe index for step t ≥ 1 and sub-population g. */
  readonly planOf: Int32Array;
  readonly treatments: readonly Treatment[];
  readonly events: readonly Disturbance[];
  /** Indices of the events that strike the whole landscape at once. */
  readonly landscapeEvents: readonly number[];
  /** Zones: how many (1 without), and for landscape events limited to some, `eventIn[n*G + g]` = 1 when landscape event n strikes sub-population g. */
  readonly zones: number;
  readonly eventIn?: Uint8Array;
  /** True when every step uses the drawn matrix unchanged: the engine skips building matrices. */
  readonly trivial: boolean;
}

/**
 * Partial-area treatments are tracked as separate sub-populations (treated and untreated land)
 * rather than one blended matrix, so that after a treatment stops its land carries on from the
 * mix it reached — a blended matrix would forget that. Within a year the order is: treatments
 * change the rows (file order), sites make their yearly transition, then disturbances strike
 * (site-scope ones folded into the year's matrix, landscape ones after, in file order).
 */
export function buildPlan(scenario: Pick<Scenario, 'fit' | 'horizonSteps' | 'treatments' | 'events' | 'zones'>): RunPlan {
  const k = scenario.fit.states.length;
  const horizon = scenario.horizonSteps;
  const { treatments, events } = scenario;
  const parcels: string[] = [];
  const areas: number[] = [];
  const parcelZones: (readonly number[] | undefined)[] = [];
  for (const t of treatments) {
    if (t.area < 1 && !parcels.includes(t.parcel)) { parcels.push(t.parcel); areas.push(t.area); parcelZones.push(t.zones); }
  }
  const within = (zones: readonly number[] | undefined, z: number): boolean => zones === undefined || zones.includes(z);
  // Zones are strata of the area (their shares add to 1); parcels are placed within the zones they
  // name, so a parcel's area is a share of each of those zones' land and none of the others'.
  const zoneShares = scenario.zones?.shares ?? [1];
  const subPopulations: SubPopulation[] = [];
  for (let zone = 0; zone < zoneShares.length; zone++) {
    for (let mask = 0; mask < 1 << parcels.length; mask++) {
      let weight = zoneShares[zone]!;
      areas.forEach((a, p) => { weight *= !within(parcelZones[p], zone) ? (mask & (1 << p) ? 0 : 1) : mask & (1 << p) ? a : 1 - a; });
      if (weight > 0 || !scenario.zones) subPopulations.push({ weight, mask, zone });
    }
  }
  const G = subPopulations.length;
  const plans: Plan[] = [];
  const byKey = new Map<string, number>();
  const planOf = new Int32Array((horizon + 1) * G);
  for (let t = 1; t <= horizon; t++) {
    subPopulations.forEach((part, g) => {
      const changes = treatments.flatMap((tr, n) => {
        const inside = within(tr.zones, part.zone) && (tr.area === 1 || (part.mask & (1 << parcels.indexOf(tr.parcel))) !== 0);
        return inside && tr.weights[t]! > 0 ? [{ treatment: n, weight: tr.weights[t]! }] : [];
      });
      const siteEvents = events.flatMap((e, n) => (e.scope === 'site' && e.chances[t]! > 0 && within(e.zones, part.zone) ? [{ event: n, chance: e.chances[t]! }] : []));
      const key = JSON.stringify([part.zone, changes, siteEvents]);
      let index = byKey.get(key);
      if (index === undefined) {
        index = plans.length;
        plans.push({ zone: part.zone, changes, siteEvents });
        byKey.set(key, index);
      }
      planOf[t * G + g] = index;
    });
  }
  const landscapeEvents = events.flatMap((e, n) => (e.scope === 'landscape' ? [n] : []));
  const trivial = G === 1 && plans.every((p) => p.changes.length === 0 && p.siteEvents.length === 0);
  const limited = landscapeEvents.some((e) => events[e]!.zones !== undefined);
  const eventIn = limited ? Uint8Array.from(landscapeEvents.flatMap((e) => subPopulations.map((part) => (within(events[e]!.zones, part.zone) ? 1 : 0)))) : undefined;
  return { k, horizon, subPopulations, plans, planOf, treatments, events, landscapeEvents, trivial, zones: zoneShares.length, ...(eventIn ? { eventIn } : {}) };
}
