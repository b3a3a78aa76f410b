import type { Scenario } from '../scenario/scenario.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import { buildPlan } from './plan.js';
import { stationaryOnThreads, type StationaryDraws } from './stationary-draws.js';
import { stationaryOutputs } from './stationary-tasks.js';

/** The long-run mix if the treatments acting in the horizon year went on for ever. */
export interface TreatedStationary extends StationaryDraws {
  /** The step whose treated matrices are taken to last: the horizon. */
  readonly step: number;
  /** Indices (into scenario.treatments) of the treatments acting in that step. */
  readonly treatments: readonly number[];
}

/**
 * Long-run mix of the treated chain, draw by draw: each sub-population of the run (the land inside
 * one combination of partial-area parcels, plan.ts) keeps the matrix it has in the horizon year —
 * the drawn matrix with the treatments acting that year, at that year's strength — for ever. Land
 * does not move between sub-populations, so each settles to the stationary mix of its own matrix,
 * and the landscape's long-run mix is the area-weighted mixture Σ_g w_g·π_g of those mixes. With one
 * whole-area treatment this is simply the stationary mix of the treated matrix. A draw counts only
 * when every sub-population's mix is unique (one closed class; Kemeny & Snell 1960); the others are
 * counted, never averaged in.
 *
 * Events are left out, as they are from the fitted chain's long-run mix it sits beside (only the
 * treatments differ between the two). Null when no treatment acts in the horizon year: the treated
 * land then carries on under the fitted chain, whose long-run mix is already reported.
 */
export function treatedStationary(scenario: Scenario, matrices: MatrixDraws, threads = 1): TreatedStationary | null {
  if (scenario.treatments.length === 0) return null;
  const plan = buildPlan({ ...scenario, events: [] });
  const H = scenario.horizonSteps;
  const { k, count } = matrices;
  const G = plan.subPopulations.length;
  const recipes = Int32Array.from(plan.subPopulations, (_, g) => plan.planOf[H * G + g]!);
  const acting = [...new Set([...recipes].flatMap((p) => plan.plans[p]!.changes.map((c) => c.treatment)))].sort((a, b) => a - b);
  if (acting.length === 0) return null;
  const weights = Float64Array.from(plan.subPopulations, (g) => g.weight);
  const mixes = stationaryOnThreads({ kind: 'treated', k, count, data: matrices.data, plan, recipes, weights, ...stationaryOutputs(count, k) }, threads);
  return { step: H, treatments: acting, ...mixes };
}
