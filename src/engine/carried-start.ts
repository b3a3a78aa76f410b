import { carriedMix } from '../chain/latest-mix.js';
import type { Scenario } from '../scenario/scenario.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import { sharedFloat64 } from '../uncertainty/draw-blocks.js';

/**
 * Each draw's starting mix when some sites were not surveyed at the latest time: the surveyed sites
 * as found plus every other site carried forward from its last survey through that draw's matrix
 * (chain/latest-mix.ts `carriedMix`: e_s·P_dᵍ, the forward filter with no survey since). So no
 * site is left out, and where the unsurveyed sites are now stays as uncertain as the matrix. The
 * years before the start carry no scenario treatment or event. Undefined when every site was
 * surveyed at the start: the scenario's one start is then exact, and the engine uses it.
 * With observer error the draws carry their own starts — the true mix behind the records.
 */
export function carriedStarts(scenario: Pick<Scenario, 'start' | 'fit' | 'zones'>, matrices: MatrixDraws): Float64Array | undefined {
  if (scenario.zones) return zonedStarts(scenario.zones, scenario.fit, matrices);
  // With observer error each draw comes with the true mix of its own sampler sweep (uncertainty/posterior.ts).
  if (scenario.start.from === 'latest' && matrices.starts) return matrices.starts;
  if (!scenario.start.carried?.length) return undefined;
  const { k, count: D, data } = matrices;
  const starts = sharedFloat64(D * k);
  const latest = { ...scenario.fit.latest, carried: scenario.start.carried };
  for (let d = 0; d < D; d++) carriedMix(latest, data, k, d * k * k, starts.subarray(d * k, (d + 1) * k));
  return starts;
}

/**
 * The same per zone: draw d's starts at `d*Z*k`, zone z's sites carried through zone z's draw d
 * (MatrixDraws.zones); a zone with every site surveyed at the start keeps its surveyed mix.
 */
function zonedStarts(zones: NonNullable<Scenario['zones']>, fit: Scenario['fit'], matrices: MatrixDraws): Float64Array | undefined {
  if (!zones.carried.some((c) => c?.length)) return undefined;
  const { k, count: D, data } = matrices;
  const Z = zones.names.length;
  const starts = sharedFloat64(D * Z * k);
  zones.carried.forEach((carried, z) => {
    const latest = { ...fit.zones!.zones[z]!.fit.latest, carried: carried ?? [] };
    for (let d = 0; d < D; d++) {
      const out = starts.subarray((d * Z + z) * k, (d * Z + z + 1) * k);
      if (carried?.length) carriedMix(latest, data, k, (z * D + d) * k * k, out);
      else out.set(zones.starts.subarray(z * k, (z + 1) * k));
    }
  });
  return starts;
}
