import { chiSquareUpperTail } from '../chain/chi-square.js';
import { stratifiedIndependence, type Table } from '../chain/contingency.js';
import { homogeneity, orderOneVsTwo, orderSelection, orderZeroVsOne, type OrderFit } from '../chain/markov-tests.js';
import type { PeriodCounts } from '../chain/counts.js';
import type { SiteCountTable } from '../chain/site-counts.js';
import { fitMask, type Fit } from '../fit/fit.js';
import { bootstrapPValue } from '../uncertainty/bootstrap-p-value.js';
import type { RandomStream } from '../uncertainty/random.js';
import { periodStandout, type PeriodStandout } from './period-standout.js';

/**
 * Cochran's (1954) rule, common practice: the chi-square approximation is doubted when more than a
 * fifth of the expected counts are below 5. Such tests also get a parametric-bootstrap p-value.
 */
export const SPARSE_SHARE = 0.2;

export interface TestReport {
  readonly name: string;
  /** What a small p-value says, in words. */
  readonly meaning: string;
  readonly g2: number;
  readonly x2: number;
  readonly df: number;
  readonly pG2: number;
  readonly pX2: number;
  /** Parametric-bootstrap p-value for G², when the table is sparse or it was asked for. */
  readonly pBootstrap: number | null;
  readonly n: number;
  readonly cells: number;
  readonly smallCells: number;
  readonly sparse: boolean;
  /** Strata compared (periods or groups), when there are any. */
  readonly strata?: readonly string[];
}

export interface AssumptionTests {
  readonly order: readonly TestReport[];
  readonly orderSelection: readonly OrderFit[] | null;
  readonly periods: TestReport | null;
  readonly groups: TestReport | null;
  /** Which period differs most, and the periods test without it (period-standout.ts). */
  readonly periodStandout: PeriodStandout | null;
  /** Set when the periods were grouped into blocks by default (a long record with few transitions a period). */
  readonly periodBlocks: { readonly periods: number; readonly blocks: number } | null;
  /** Why a test could not be run (no runs of three surveys, no group column, one period …). */
  readonly unavailable: readonly string[];
}

export interface TestOptions {
  readonly random: RandomStream;
  /** Replicates for bootstrap p-values. */
  readonly replicates: number;
  /** Bootstrap every test, not only sparse ones. */
  readonly simulateAll: boolean;
  /** Periods grouped by the survey year they start in: [first, last] ranges, inclusive. */
  readonly periodGroups?: readonly (readonly [number, number])[];
}

function report(name: string, meaning: string, strata: readonly Table[], options: TestOptions, labels?: readonly string[]): TestReport {
  const stat = stratifiedIndependence(strata);
  const sparse = stat.cells > 0 && stat.smallCells / stat.cells > SPARSE_SHARE;
  const pBootstrap = (sparse || options.simulateAll) && stat.df > 0
    ? bootstrapPValue(strata, stat.g2, options.replicates, options.random)
    : null;
  return {
    name, meaning, g2: stat.g2, x2: stat.x2, df: stat.df,
    pG2: chiSquareUpperTail(stat.g2, stat.df), pX2: chiSquareUpperTail(stat.x2, stat.df), pBootstrap,
    n: stat.n, cells: stat.cells, smallCells: stat.smallCells, sparse,
    ...(labels ? { strata: labels } : {}),
  };
}

/**
 * Tests of the assumptions behind every forecast: the chain's order (does the next state depend
 * only on the current one?), time-homogeneity across survey periods, and homogeneity across
 * groups of sites (Anderson & Goodman 1957; Bishop, Fienberg & Holland 1975, ch. 7).
 */
export function assumptionTests(fit: Fit, options: TestOptions): AssumptionTests {
  const k = fit.states.length;
  const unavailable: string[] = [];
  const order = [report('order 0 vs 1', 'the next state depends on the current one (a chain is needed at all)',
    orderZeroVsOne(fit.counts, k), options)];
  let selection: OrderFit[] | null = null;
  if (fit.triples && fit.triples.length > 0) {
    order.push(report('order 1 vs 2', 'the state before the current one matters too: the chain is not first order',
      orderOneVsTwo(fit.triples, k), options));
    selection = orderSelection(fit.triples, k, fitMask(fit));
  } else {
    unavailable.push(fit.triples ? 'order 1 vs 2: no site has three surveys in a row one step apart'
      // A survey-table fit always has triples and a fit file no history: this is a counts table's fit.
      : fit.history
        ? 'order 1 vs 2: a counts table has no runs of three surveys; run sere check on the survey table'
        : 'order 1 vs 2: this fit file has no second-order counts; refit from the survey table');
  }

  let periods: TestReport | null = null;
  let standout: PeriodStandout | null = null;
  const ranges = options.periodGroups ?? (fit.periods ? defaultBlocks(fit.periods) : undefined);
  const periodBlocks = !options.periodGroups && ranges ? { periods: fit.periods!.length, blocks: ranges.length } : null;
  const grouped = fit.periods ? groupPeriods(fit.periods, fit.step, ranges) : [];
  if (grouped.length >= 2) {
    periods = report('periods', 'transition probabilities changed between survey periods',
      homogeneity(grouped.map((g) => g.cells), k), options, grouped.map((g) => g.label));
    standout = periodStandout(grouped, k);
  } else {
    unavailable.push(fit.periods ? 'periods: fewer than two survey periods with transitions'
      : 'periods: this fit file has no per-period counts; refit from the survey table');
  }

  let groups: TestReport | null = null;
  const byGroup = groupSites(fit.sites);
  if (byGroup.length >= 2) {
    groups = report('groups', `transition probabilities differ between groups of sites (${fit.groupColumn ?? 'group'})`,
      homogeneity(byGroup.map((g) => g.cells), k), options, byGroup.map((g) => g.label));
  } else {
    unavailable.push(fit.pooledSites !== undefined
      ? 'groups: this fit has pooled counts only; count with sere count --per-site --group-column, or use the survey table'
      : fit.groupColumn ? 'groups: fewer than two groups with transitions' : 'groups: no group column (use --group-column)');
  }
  return { order, orderSelection: selection, periods, groups, periodStandout: standout, periodBlocks, unavailable };
}

/** At most this many blocks of periods are tested by default on a long record with few transitions a period. */
export const MAX_PERIOD_BLOCKS = 10;
/**
 * Below this many transitions a period on average, and with more than MAX_PERIOD_BLOCKS periods
 * (a daily or yearly record of one or a few sites), each period's row of the table is almost all
 * zeros and hundreds of one-pair periods make a test with hundreds of degrees of freedom and no
 * power: consecutive periods are grouped into MAX_PERIOD_BLOCKS blocks of nearly equal numbers of
 * periods instead. Our rule, stated; `--periods` overrides it.
 */
export const FEW_TRANSITIONS_PER_PERIOD = 10;

function defaultBlocks(periods: readonly PeriodCounts[]): [number, number][] | undefined {
  const P = periods.length;
  if (P <= MAX_PERIOD_BLOCKS) return undefined;
  let total = 0;
  for (const p of periods) for (const [, , n] of p.cells) total += n;
  if (total / P >= FEW_TRANSITIONS_PER_PERIOD) return undefined;
  return Array.from({ length: MAX_PERIOD_BLOCKS }, (_, b) => {
    const first = Math.floor((b * P) / MAX_PERIOD_BLOCKS);
    const last = Math.floor(((b + 1) * P) / MAX_PERIOD_BLOCKS) - 1;
    return [periods[first]!.time, periods[last]!.time] as [number, number];
  });
}

type Cells = [number, number, number][];

/** Periods by start time, or merged into the user's ranges of start years. */
function groupPeriods(periods: readonly PeriodCounts[], step: number, ranges?: readonly (readonly [number, number])[]): { label: string; cells: Cells }[] {
  if (!ranges) return periods.map((p) => ({ label: `${p.time}→${p.time + step}`, cells: [...p.cells] as Cells }));
  return ranges.map(([a, b]) => ({
    // The range as typed (start years), then the last survey its transitions reach.
    label: `${a}–${b} (to ${b + step})`,
    cells: periods.filter((p) => p.time >= a && p.time <= b).flatMap((p) => p.cells) as Cells,
  })).filter((g) => g.cells.length > 0);
}

function groupSites(sites: SiteCountTable): { label: string; cells: Cells }[] {
  const byGroup = new Map<string, Cells>();
  for (const s of sites.toJSON()) {
    if (s.group === undefined) continue;
    const list = byGroup.get(s.group) ?? [];
    list.push(...(s.cells as Cells));
    byGroup.set(s.group, list);
  }
  return [...byGroup.entries()].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0)).map(([label, cells]) => ({ label, cells }));
}
