import { refuseErrors } from './error-fit.js';
import { SereError, quote } from '../errors.js';
import { compareCodePoints } from '../data/code-points.js';
import { FIRST_SURVEY, isLastSurvey, type CountCell, type CountsTable, type SiteCell } from '../data/counts-table.js';
import { gapCellsOf, gapNotWholeSteps, pairsByGapOf, periodList } from '../chain/counts.js';
import { gcd } from '../chain/structure.js';
import type { CarriedSites, MixAtTime } from '../chain/latest-mix.js';
import { SiteCountBuilder, type SiteCountTable } from '../chain/site-counts.js';
import { impossibleMask, type FitSettings } from './settings.js';
import { checkTransitions, type Fit } from './fit.js';
import { settingName } from '../setting-name.js';

/** The column name a fit from a counts table reports for its groups, unless the settings name one. */
export const COUNTS_GROUP_COLUMN = 'site_group';

/**
 * A fit from a counts table (`sere count`, or `sere count --sql` run elsewhere). The counts are
 * the sufficient statistics, so everything a survey-table fit computes from counts comes out the
 * same — counts, skipped pairs, pairs by gap, periods, the surveyed mix at every time, and, with
 * per-site counts, the site table the bootstrap resamples; with last-survey rows, the sites not
 * surveyed at the latest time, carried into a forecast's start as a survey-table fit carries them
 * (tables without those rows start from the surveyed sites only). What needs runs of surveys (the order
 * test's triples) or the rows themselves (a hindcast) is absent, and those features say so.
 */
export function fitCounts(table: CountsTable, given: FitSettings): Fit {
  refuseErrors(given, 'a counts table holds counts of pairs only');
  const settings = given.stepDefaulted ? { ...given, step: table.step } : given;
  if (settings.step !== table.step) {
    throw new SereError('BAD_OPTION', `the counts table was counted with steps of ${unitsOf(table.step)}, not ${settings.step}`,
      { file: table.file, path: '--step' }, `fit with ${settingName(`--step ${table.step}`, `fit.step: ${table.step}`)}, or count the survey table again with --step ${settings.step}`);
  }
  const cells = settings.group === undefined ? table.cells : groupCells(table.cells, table, settings.group);
  const siteCells = settings.group === undefined ? table.siteCells : table.siteCells?.filter((c) => c.group === settings.group);
  const { states, step } = table;
  const k = states.length;
  const mask = impossibleMask(settings.impossible, states, settings.places?.impossible ?? { path: '--impossible' });
  const counts = new Float64Array(k * k);
  const firstLine = new Float64Array(k * k);
  let notWhole: { dt: number; line: number } | undefined;
  const byGap = new Map<number, Float64Array>();
  const periods = new Map<number, Float64Array>();
  const history = new Map<number, number[]>();
  let transitions = 0;
  let surveys = 0;
  let pooledSites = 0;
  const lastSurveys: CountCell[] = [];
  for (const c of cells) {
    if (isLastSurvey(c)) {
      lastSurveys.push(c);
      continue;
    }
    surveys += c.n;
    const mix = history.get(c.time) ?? new Array<number>(k).fill(0);
    mix[c.to]! += c.n;
    history.set(c.time, mix);
    if (c.from === FIRST_SURVEY) {
      pooledSites += c.n;
      continue;
    }
    if (c.gap !== 1) {
      if (!Number.isInteger(c.gap)) {
        // Back to time units, as the survey table had them (the gap may be a rounded fraction).
        notWhole ??= { dt: Math.round(c.gap * step), line: c.line };
        continue;
      }
      let dense = byGap.get(c.gap);
      if (dense === undefined) byGap.set(c.gap, dense = new Float64Array(k * k));
      dense[c.from * k + c.to] += c.n;
      continue;
    }
    const cell = c.from * k + c.to;
    counts[cell] += c.n;
    transitions += c.n;
    if (c.line > 0 && (firstLine[cell] === 0 || c.line < firstLine[cell]!)) firstLine[cell] = c.line;
    let period = periods.get(c.time - step);
    if (period === undefined) periods.set(c.time - step, period = new Float64Array(k * k));
    period[cell] += c.n;
  }
  if (notWhole) throw gapNotWholeSteps(table.file, notWhole.line, notWhole.dt, step, gapDivisor(cells, step));
  const mixes: MixAtTime[] = [...history].sort((a, b) => a[0] - b[0])
    .map(([time, c]) => ({ time, counts: c, sites: c.reduce((a, b) => a + b, 0) }));
  const latest = mixes[mixes.length - 1]!;
  const gapCounts = gapCellsOf(byGap, k);
  const pairsByGap = pairsByGapOf(transitions, gapCounts);
  checkTransitions({ file: table.file, states, step, mask, counts, transitions, pairsByGap, gapCounts, firstLine });
  const perSite = siteCells ? siteTable(siteCells, k, table, counts) : undefined;
  const sites = perSite?.sites ?? new SiteCountBuilder(k, false).table();
  return {
    input: { file: table.file, sha256: table.sha256 },
    states,
    step,
    prior: settings.prior,
    impossible: settings.impossible,
    counts,
    sites,
    ...(perSite ? { siteGaps: perSite.siteGaps } : { pooledSites }),
    transitions,
    skipped: [],
    gapCounts,
    pairsByGap,
    repeatedRows: table.repeatedRows,
    surveys,
    firstTime: mixes[0]!.time,
    latest: { time: latest.time, counts: latest.counts, shares: latest.counts.map((c) => c / latest.sites), sites: latest.sites,
      ...(lastSurveys.length > 0 ? carriedSites(lastSurveys, latest.time, step, k) : {}) },
    periods: periodList(periods, k),
    ...(table.grouped ? { groupColumn: settings.columns.group ?? COUNTS_GROUP_COLUMN } : {}),
    history: mixes,
  };
}

/**
 * Sites last surveyed before the latest time, by state and whole steps back, from the last-survey
 * rows — what chain/latest-mix.ts `latestSurveyedMix` finds from the rows of a survey table.
 */
function carriedSites(lastSurveys: readonly CountCell[], latest: number, step: number, k: number): { carried: CarriedSites[]; notCarried: number } {
  const carried = new Map<number, number>();
  let notCarried = 0;
  for (const c of lastSurveys) {
    if (c.time === latest) continue;
    const gap = latest - c.time;
    if (gap % step !== 0) {
      notCarried += c.n;
      continue;
    }
    const key = (gap / step) * k + c.from;
    carried.set(key, (carried.get(key) ?? 0) + c.n);
  }
  const list = [...carried].sort((a, b) => a[0] - b[0]).map(([key, n]) => ({ state: key % k, steps: Math.floor(key / k), sites: n }));
  return { carried: list, notCarried };
}

function groupCells(cells: readonly CountCell[], table: CountsTable, group: string): CountCell[] {
  if (!table.grouped) {
    throw new SereError('BAD_OPTION', `fitting group ${quote(group)} needs a counts table counted by group`, { file: table.file },
      'count the survey table again with --group-column');
  }
  const selected = cells.filter((c) => c.group === group);
  if (selected.length === 0) {
    const groups = [...new Set(cells.map((c) => c.group!))].sort(compareCodePoints);
    throw new SereError('BAD_OPTION', `no rows with site_group = ${quote(group)}`, { file: table.file }, `use one of: ${groups.join(', ')}`);
  }
  return selected;
}

/**
 * The site bootstrap's tables from per-site cells: every site (each has a first survey), in
 * code-point order, with its one-step cells in cell order, and, aligned with them, its pairs further
 * apart (cell (g − 2)·k² + i·k + j, as chain/counts.ts keeps them), which the bootstrap with gaps
 * refits. The per-site counts must add up to the pooled ones — a hand-edited file that breaks this
 * is refused rather than bootstrapped.
 */
function siteTable(siteCells: readonly SiteCell[], k: number, table: CountsTable, counts: Float64Array): { sites: SiteCountTable; siteGaps: SiteCountTable } {
  const bySite = new Map<string, SiteCell[]>();
  for (const c of siteCells) {
    const list = bySite.get(c.site);
    if (list) list.push(c); else bySite.set(c.site, [c]);
  }
  const builder = new SiteCountBuilder(k, table.grouped);
  const gapBuilder = new SiteCountBuilder(k, false);
  const total = new Float64Array(k * k);
  for (const id of [...bySite.keys()].sort(compareCodePoints)) {
    const dense = new Map<number, number>();
    const gapped = new Map<number, number>();
    for (const c of bySite.get(id)!) {
      if (c.from === FIRST_SURVEY) continue;
      if (c.gap !== 1) {
        if (Number.isInteger(c.gap) && c.gap >= 2) {
          const wide = (c.gap - 2) * k * k + c.from * k + c.to;
          gapped.set(wide, (gapped.get(wide) ?? 0) + c.n);
        }
        continue;
      }
      dense.set(c.from * k + c.to, (dense.get(c.from * k + c.to) ?? 0) + c.n);
    }
    for (const wide of [...gapped.keys()].sort((a, b) => a - b)) gapBuilder.cell(wide, gapped.get(wide)!);
    gapBuilder.endSite(id, undefined);
    for (const cell of [...dense.keys()].sort((a, b) => a - b)) {
      builder.cell(cell, dense.get(cell)!);
      total[cell] += dense.get(cell)!;
    }
    builder.endSite(id, table.grouped ? bySite.get(id)![0]!.group : undefined);
  }
  if (total.some((n, c) => n !== counts[c])) {
    throw new SereError('BAD_COUNTS', 'the per-site counts do not add up to the pooled counts', { file: table.file },
      'count the survey table again with sere count --per-site (do not edit a counts table by hand)');
  }
  return { sites: builder.table(), siteGaps: gapBuilder.table() };
}

function unitsOf(step: number): string {
  return `${step} time unit${step === 1 ? '' : 's'}`;
}

/** The largest step (in time units) that divides every gap of the table: what --step should be. */
function gapDivisor(cells: readonly CountCell[], step: number): number {
  let d = 0;
  for (const c of cells) if (c.from !== FIRST_SURVEY && c.gap > 0) d = gcd(d, Math.round(c.gap * step));
  return d;
}
