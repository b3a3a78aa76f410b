import type { Scenario } from '../scenario/scenario.js';
import { drawMatrices } from '../uncertainty/draw-matrices.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import type { RandomStream } from '../uncertainty/random.js';
import { drawZoneMatrices } from '../uncertainty/zone-draws.js';

/** A scenario's matrix draws: one set for the landscape, or one per zone for a stratified forecast (zone-draws.ts). */
export function scenarioDraws(scenario: Pick<Scenario, 'fit' | 'source' | 'variation' | 'zones'>, count: number, random: RandomStream): MatrixDraws {
  return scenario.zones
    ? drawZoneMatrices(scenario.fit, scenario.source, count, random, scenario.variation)
    : drawMatrices(scenario.fit, scenario.source, count, random, scenario.variation);
}

/** Zone z's draws alone, as an unzoned set (views on the same memory). */
export function zoneView(matrices: MatrixDraws, z: number): MatrixDraws {
  const { k, count } = matrices;
  const k2 = k * k;
  const { zones: _, concentration, ...rest } = matrices;
  return {
    ...rest,
    data: matrices.data.subarray(z * count * k2, (z + 1) * count * k2),
    ...(concentration ? { concentration: concentration.subarray(z * count * k, (z + 1) * count * k) } : {}),
  };
}
