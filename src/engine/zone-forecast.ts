import type { Scenario } from '../scenario/scenario.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import type { RandomStream } from '../uncertainty/random.js';
import type { EngineOptions } from './engine-options.js';
import { zoneView } from './scenario-draws.js';
import { simulate } from './simulate.js';
import type { ShareBands } from './year-bands.js';

/** One zone of a stratified forecast on its own: its share of the whole area, and the bands of its mix (shares of the zone). */
export interface ZoneForecast {
  readonly name: string;
  readonly share: number;
  /** Per state, bands of the share of the zone's own area at each recorded step. */
  readonly shares: ShareBands[];
}

/**
 * Each zone projected alone — its own draws (the same as in the landscape run), its own start, the
 * treatments and events that act in it (a treatment's area being a share of its zones, it is the
 * same share of this one) — on the same random streams as the landscape run. Draw d of a zone is
 * the landscape run's draw d of that zone; the year matrices are the landscape run's for the first
 * zone and drawn afresh (same distribution) for the others, so a zone's bands are its forecast,
 * not a slice of the landscape run draw by draw. `record`: the steps whose bands are kept (default every step).
 */
export function zoneForecasts(scenario: Scenario, matrices: MatrixDraws, random: RandomStream, engine: EngineOptions = {},
  record?: readonly number[]): ZoneForecast[] {
  const zones = scenario.zones!;
  const k = scenario.fit.states.length;
  return zones.names.map((name, z) => {
    const inZone = <T extends { readonly zones?: readonly number[] }>(items: readonly T[]): T[] =>
      items.filter((t) => t.zones === undefined || t.zones.includes(z)).map((t) => ({ ...t, zones: undefined }));
    const alone: Scenario = {
      ...scenario,
      target: undefined,
      plots: undefined,
      treatments: inZone(scenario.treatments),
      events: inZone(scenario.events),
      zones: {
        names: [name], shares: Float64Array.of(1), from: zones.from,
        starts: zones.starts.slice(z * k, (z + 1) * k), carried: [zones.carried[z]],
      },
    };
    const view = { ...zoneView(matrices, z), zones: 1 };
    const sim = simulate(alone, view, random, { switches: { noPlots: true }, chunkBytes: engine.chunkBytes, threads: engine.threads, ...(record ? { record } : {}) });
    return { name, share: zones.shares[z]!, shares: sim.shares };
  });
}
