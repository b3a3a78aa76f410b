import { siteCount } from '../fit/fit.js';
import type { CheckResult } from '../diagnostics/check.js';
import type { TestReport } from '../diagnostics/assumption-tests.js';
import type { Estimate } from '../diagnostics/chain-properties.js';
import { TOOL_VERSION } from '../version.js';
import { toRows } from '../chain/matrix.js';
import { zoneSamplerJson } from '../fit/zones-json.js';
import { standoutLine, verdict, verdictP, VERDICT_LEVEL } from './check-verdicts.js';

/** The documented JSON of `sere check --json`. States by name; matrices as rows, row = from. */
export function checkJson(r: CheckResult): object {
  const { fit, tests, properties: pr } = r;
  const states = fit.states;
  const k = states.length;
  const names = (list: readonly number[]): string[] => list.map((s) => states[s]!);
  const est = (e: Estimate): object => ({ point: e.point, median: num(e.median), low: num(e.low), high: num(e.high), draws: e.draws });
  return {
    format: 'sere-check',
    format_version: 1,
    tool_version: TOOL_VERSION,
    data: { file: fit.input.file, sha256: fit.input.sha256, sites: siteCount(fit), transitions: fit.transitions },
    states,
    level: r.settings.level,
    posterior_draws: r.settings.draws,
    seed: r.seed,
    // Only with an error table, so other checks keep their bytes: the tests read the records, the properties the true chain.
    ...(fit.errorModel ? { scales: { tests: 'recorded', properties: 'true' } } : {}),
    tests: {
      order: tests.order.map(testJson),
      order_selection: tests.orderSelection,
      periods: tests.periods && testJson(tests.periods),
      groups: tests.groups && testJson(tests.groups),
      not_tested: tests.unavailable,
      verdicts: [...tests.order, ...[tests.periods, tests.groups].filter((t): t is TestReport => t !== null)]
        .map((t) => ({ test: t.name, p: verdictP(t), evidence_against: verdictP(t) < VERDICT_LEVEL, text: verdict(t) })),
      period_blocks: tests.periodBlocks,
      period_standout: tests.periodStandout && {
        ranked: tests.periodStandout.ranked.map((c) => ({ period: c.label, g2: c.g2 })),
        without_top: tests.periodStandout.withoutTop,
        text: standoutLine(tests.periodStandout),
      },
    },
    variation: r.variation && Object.fromEntries(states.map((name, s) => {
      const v = r.variation![s]!;
      return [name, { status: v.status, kappa: v.kappa, kappa_mle: v.mle === Infinity ? 'infinite' : v.mle, informative_periods: v.informativePeriods }];
    })),
    structure: {
      classes: pr.structure.classes.map((c, n) => ({ states: names(c), closed: pr.structure.closed[n], period: pr.structure.periods[n] })),
      irreducible: pr.structure.irreducible,
      transient: names(pr.structure.transient),
      absorbing: names(pr.structure.absorbing),
      eigenvalues: pr.eigenvalues,
    },
    residence: Object.fromEntries(states.map((name, s) => [name, est(pr.residence[s]!)])),
    mean_first_passage: pr.passage ? states.map((_, i) => states.map((__, j) => est(pr.passage![i * k + j]!))) : null,
    absorption: pr.absorption
      ? {
        transient: names(pr.absorption.transient),
        closed_classes: pr.absorption.closedClasses.map(names),
        fundamental_matrix: toRows(pr.absorption.fundamental, pr.absorption.transient.length),
        steps: pr.absorption.steps.map(est),
        ends: pr.absorption.transient.map((_, a) => pr.absorption!.closedClasses.map((__, c) => est(pr.absorption!.ends[a * pr.absorption!.closedClasses.length + c]!))),
      }
      : null,
    settling: pr.settling
      ? { slem: est(pr.settling.slem), damping_ratio: est(pr.settling.damping), steps_to_within_5pct: est(pr.settling.steps) }
      : null,
    sensitivity: {
      target: r.settings.target ? { state: states[r.settings.target.state], steps: r.settings.target.steps } : null,
      transitions: pr.sensitivity.map((x) => ({
        from: states[x.from], to: states[x.to], probability: x.probability,
        stationary: Object.fromEntries(states.map((name, s) => [name, x.stationary[s]])),
        horizon: x.horizon ?? null,
      })),
    },
    // Only for partially pooled zones, so other checks keep their bytes: the zones' sampler, each zone's cells after the shared ones.
    ...(fit.zones?.sampler ? {
      zone_sampler: {
        ...zoneSamplerJson(fit.zones.sampler, k),
        zones: fit.zones.zones.map((z, n) => ({
          name: z.name,
          rhat: toRows(Array.from(fit.zones!.sampler!.zones.rhat.subarray(n * k * k, (n + 1) * k * k), num), k),
          ess: toRows(Array.from(fit.zones!.sampler!.zones.ess.subarray(n * k * k, (n + 1) * k * k), num), k),
        })),
      },
    } : {}),
  };
}

function testJson(t: TestReport): object {
  return {
    name: t.name, g2: t.g2, x2: t.x2, df: t.df, p_g2: t.pG2, p_x2: t.pX2, p_bootstrap: t.pBootstrap,
    n: t.n, cells: t.cells, small_expected_cells: t.smallCells, sparse: t.sparse, strata: t.strata ?? null,
  };
}

/** NaN (no draw defined the quantity) is not JSON: null. */
function num(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}
