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
}

/** One distinct recipe for a year's matrix: which changes at which strength, which site events. */
export interface Plan {
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
export function buildPlan(scenario: Pick<Scenario, 'fit' | 'horizonSteps' | 'treatments' | 'events'>): RunPlan {
  const k = scenario.fit.states.length;
  const horizon = scenario.horizonSteps;
  const { treatments, events } = scenario;
  const parcels: string[] = [];
  const areas: number[] = [];
  for (const t of treatments) {
    if (t.area < 1 && !parcels.includes(t.parcel)) { parcels.push(t.parcel); areas.push(t.area); }
  }
  const subPopulations: SubPopulation[] = [];
  for (let mask = 0; mask < 1 << parcels.length; mask++) {
    let weight = 1;
    areas.forEach((a, p) => { weight *= mask & (1 << p) ? a : 1 - a; });
    subPopulations.push({ weight, mask });
  }
  const G = subPopulations.length;
  const plans: Plan[] = [];
  const byKey = new Map<string, number>();
  const planOf = new Int32Array((horizon + 1) * G);
  for (let t = 1; t <= horizon; t++) {
    subPopulations.forEach((part, g) => {
      const changes = treatments.flatMap((tr, n) => {
        const inside = tr.area === 1 || (part.mask & (1 << parcels.indexOf(tr.parcel))) !== 0;
        return inside && tr.weights[t]! > 0 ? [{ treatment: n, weight: tr.weights[t]! }] : [];
      });
      const siteEvents = events.flatMap((e, n) => (e.scope === 'site' && e.chances[t]! > 0 ? [{ event: n, chance: e.chances[t]! }] : []));
      const key = JSON.stringify([changes, siteEvents]);
      let index = byKey.get(key);
      if (index === undefined) {
        index = plans.length;
        plans.push({ changes, siteEvents });
        byKey.set(key, index);
      }
      planOf[t * G + g] = index;
    });
  }
  const landscapeEvents = events.flatMap((e, n) => (e.scope === 'landscape' ? [n] : []));
  const trivial = G === 1 && plans.every((p) => p.changes.length === 0 && p.siteEvents.length === 0);
  return { k, horizon, subPopulations, plans, planOf, treatments, events, landscapeEvents, trivial };
}
