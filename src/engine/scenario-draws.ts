import type { Scenario } from '../scenario/scenario.js';
import { drawMatrices } from '../uncertainty/draw-matrices.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import type { RandomStream } from '../uncertainty/random.js';
import { drawZoneMatrices } from '../uncertainty/zone-draws.js';
import { cachedSample } from '../uncertainty/sample-cache.js';

/**
 * A scenario's matrix draws: one set for the landscape, or one per zone for a stratified forecast
 * (zone-draws.ts). Read from the sample cache when an earlier run made the same ones
 * (sample-cache.ts): the key holds every input here, and the random stream by seed and name — the
 * samplers take only named sub-streams of it, which start the same whatever ran before.
 */
export function scenarioDraws(scenario: Pick<Scenario, 'fit' | 'source' | 'variation' | 'zones'>, count: number, random: RandomStream): MatrixDraws {
  const zoned = Boolean(scenario.zones);
  return cachedSample({ draws: 'scenario', fit: scenario.fit, source: scenario.source, variation: scenario.variation, zoned, count,
    seed: random.seed, stream: random.name }, () => zoned
    ? drawZoneMatrices(scenario.fit, scenario.source, count, random, scenario.variation)
    : drawMatrices(scenario.fit, scenario.source, count, random, scenario.variation));
}

/** Zone z's draws alone, as an unzoned set (views on the same memory). */
export function zoneView(matrices: MatrixDraws, z: number): MatrixDraws {
  const { k, count } = matrices;
  const k2 = k * k;
  const { zones: _, concentration, zoneVariation, ...rest } = matrices;
  const own = zoneVariation?.[z];
  return {
    ...rest,
    ...(own ? { variation: own } : {}),
    data: matrices.data.subarray(z * count * k2, (z + 1) * count * k2),
    ...(concentration ? { concentration: concentration.subarray(z * count * k, (z + 1) * count * k) } : {}),
  };
}
