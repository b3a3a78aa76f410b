import type { Scenario } from '../scenario/scenario.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import { multinomialSampler } from '../uncertainty/multinomial.js';
import type { RandomStream } from '../uncertainty/random.js';
import { eventHits } from './event-hits.js';
import { buildPlan } from './plan.js';
import { simulatePlots, type PlotCounts } from './plot-counts.js';
import { propagate, type Trajectories } from './propagate.js';

export interface Simulation {
  readonly paths: Trajectories;
  readonly plots?: PlotCounts;
  readonly notes: readonly string[];
}

/** What to switch off, to see how much of the band each source of uncertainty makes (see uncertainty-split.ts). */
export interface Switches {
  /** Landscape events at their expected effect every year instead of random years. */
  readonly expectedEvents?: boolean;
  /** Shares only, no plot counts. */
  readonly noPlots?: boolean;
}

/**
 * Run one scenario on given matrix draws. Random event years and plot noise come from streams
 * named after the event and 'plots', sub-streams of `random`, so every alternative run on the same
 * draws with the same seed meets the same storms and the same plot-level chance. Treatments must
 * already have been checked on the fitted matrix (checkScenarios: runForecast and runComparison
 * do it once, not on every rerun the uncertainty split or the effort grid makes).
 */
export function simulate(scenario: Scenario, matrices: MatrixDraws, random: RandomStream, switches: Switches = {},
  onProgress?: (done: number, total: number) => void, record?: readonly number[]): Simulation {
  const runScenario = switches.expectedEvents
    ? { ...scenario, events: scenario.events.map((e) => ({ ...e, scope: 'site' as const })) }
    : scenario;
  const plan = buildPlan(runScenario);
  const D = matrices.count;
  const H = scenario.horizonSteps;
  const hits = plan.landscapeEvents.map((e) => eventHits(random.stream(`event:${plan.events[e]!.name}`), plan.events[e]!, D, H));
  const trouble = new Map<number, Set<number>>();
  const paths = propagate(matrices, scenario.start.shares, H, {
    target: scenario.target, plan, hits, onProgress, record,
    onOutcome: (draw, treatment) => {
      const draws = trouble.get(treatment) ?? new Set<number>();
      draws.add(draw);
      trouble.set(treatment, draws);
    },
  });
  const notes = [...matrices.notes];
  // A treatment whose years all fall outside the forecast is kept (a workspace's scenario may
  // outlive its treatment as seasons move the start on) but said, so it is not read as acting.
  for (const t of plan.treatments) {
    if (t.weights.every((w) => w === 0)) notes.push(`treatment '${t.name}' acts in no year of this forecast (its years lie outside it)`);
  }
  for (const [treatment, draws] of trouble) {
    notes.push(`treatment '${plan.treatments[treatment]!.name}' could not act as written in ${draws.size} of ${D} draws ` +
      '(probabilities capped at 1, or nothing left to rescale)');
  }
  const plots = scenario.plots && !switches.noPlots
    ? simulatePlots(matrices, plan, scenario.plots.start, {
      record: paths.recorded, hits, multinomial: multinomialSampler(random.stream('plots')),
    })
    : undefined;
  return { paths, plots, notes };
}
