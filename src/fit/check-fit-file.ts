import { quote } from '../errors.js';
import { labelProblem, MAX_STATES, normaliseLabel } from '../data/labels.js';
import type { KeyPath } from '../data/read-structured.js';
import { addSiteCells, compareCodePoints, pairsByGapOf, type GapCell, type PairsByGap } from '../chain/counts.js';
import { reachableInSteps } from '../chain/reachable.js';
import { SiteCountBuilder, SiteCountTable, type SiteCountsJson } from '../chain/site-counts.js';
import type { FitBody } from './fit-file-schema.js';
import type { Fit } from './fit.js';
import type { FitZones } from './zones.js';
import type { LatentSample } from './latent-sample.js';
import { maxGap } from '../chain/bridges.js';
import { impossibleMask } from './settings.js';
import { checkSpatial, type CheckedSpatial } from './check-spatial.js';
import type { ErrorModel } from './error-model.js';
import { checkErrorModel, checkErrorSweeps } from './error-model-check.js';

/** Report one broken invariant at a key path; never returns. */
export type Fail = (what: string, path: KeyPath, hint?: string) => never;

/** What the loader keeps after the checks: labels in NFC, sites in canonical order. */
export interface CheckedFitFile {
  readonly states: readonly string[];
  readonly impossible: readonly (readonly [string, string])[];
  readonly counts: Float64Array;
  /** The per-site table, or how many sites when the fit holds pooled counts only. */
  readonly sites: SiteCountTable | number;
  readonly transitions: number;
  readonly gapCounts: readonly GapCell[];
  /** Pairs by gap, worked out from counts and gap_counts (a pairs_by_gap key, when present, must agree). */
  readonly pairsByGap: readonly PairsByGap[];
  readonly latentSample?: LatentSample;
  readonly siteGaps?: SiteCountTable;
  readonly spatial: CheckedSpatial;
  readonly errorModel?: ErrorModel;
}

const PRIORS = new Map([['jeffreys', 0.5], ['uniform', 1]]);

/**
 * Every invariant the engine relies on, checked at the door: a fit file edited by hand (or by a
 * script) is refused with the key path of the first broken one, never turned into a wrong forecast.
 * A file written by `sere fit --out` always passes.
 */
export function checkFitFile(f: FitBody, fail: Fail): CheckedFitFile {
  const states = checkStates(f.states, fail);
  const k = states.length;
  const counts = checkCounts(f, k, fail);
  const transitions = counts.reduce((a, b) => a + b, 0);
  if (!Number.isSafeInteger(transitions)) fail('counts add up to more transitions than can be counted exactly', ['counts']);
  if (transitions === 0) fail('counts hold no transitions', ['counts']);
  checkPrior(f.prior, fail);
  // With observer error the recorded counts may break the impossible list: that is evidence of mislabelling.
  const errors = f.error_model !== undefined && f.error_model !== null;
  const impossible = checkImpossible(f.impossible, states, errors ? new Float64Array(k * k) : counts, fail);
  checkTimes(f, fail);
  checkLatest(f.latest, k, fail);
  const sites = checkSites(f, k, counts, fail);
  checkPeriods(f, k, counts, fail);
  checkTriples(f, k, counts, fail);
  const mask = impossibleMask(impossible, states, { path: 'impossible' });
  const gapCounts = checkGapCounts(f, states, mask, fail, errors);
  const pairsByGap = checkPairsByGap(f, transitions, gapCounts, fail);
  const errorModel = checkErrorModel(f, k, mask, fail);
  const sample = checkSampler(f, states, mask, gapCounts, fail, errorModel?.trueTransitions);
  const latentSample = sample && errorModel ? { ...sample, errors: checkErrorSweeps(f, k, errorModel, fail) } : sample;
  if (errorModel && !latentSample) fail('a fit with observer error keeps its posterior sampler', ['posterior_sampler']);
  // Pooled counts (a number of sites) have no per-site gaps: the site bootstrap refuses them anyway.
  const siteGaps = typeof sites === 'number' ? undefined : checkSiteGaps(f, k, sites, gapCounts, fail);
  const spatial = checkSpatial(f, sites, fail);
  return { states, impossible, counts, sites, transitions, gapCounts, pairsByGap, latentSample, siteGaps, spatial, ...(errorModel ? { errorModel } : {}) };
}

function checkStates(raw: readonly string[], fail: Fail): string[] {
  if (raw.length > MAX_STATES) fail(`${raw.length} states (at most ${MAX_STATES})`, ['states']);
  const states = raw.map(normaliseLabel);
  const seen = new Map<string, number>();
  states.forEach((s, i) => {
    const problem = labelProblem(s, `state ${quote(s)}`);
    if (problem) fail(problem.what, ['states', i], problem.hint);
    const first = seen.get(s);
    // Two columns with one name: shares and counts would be attributed to either at random.
    if (first !== undefined) fail(`state ${quote(s)} is listed twice (also states[${first}])`, ['states', i]);
    seen.set(s, i);
  });
  return states;
}

function checkCounts(f: FitBody, k: number, fail: Fail): Float64Array {
  if (f.counts.length !== k) fail(`counts has ${f.counts.length} rows for ${k} states`, ['counts']);
  f.counts.forEach((row, i) => { if (row.length !== k) fail(`counts row ${i} has ${row.length} entries, expected ${k}`, ['counts', i]); });
  return new Float64Array(f.counts.flat());
}

function checkPrior(prior: FitBody['prior'], fail: Fail): void {
  const fixed = PRIORS.get(prior.name);
  if (fixed === undefined && prior.name !== 'pseudo-count') {
    fail(`prior ${quote(prior.name)} is not jeffreys, uniform or pseudo-count`, ['prior', 'name']);
  }
  if (fixed !== undefined && prior.pseudo_count !== fixed) {
    fail(`the ${prior.name} prior has pseudo-count ${fixed}, not ${prior.pseudo_count}`, ['prior', 'pseudo_count'],
      `set pseudo_count to ${fixed}, or name the prior 'pseudo-count'`);
  }
}

function checkImpossible(pairs: FitBody['impossible'], states: readonly string[], counts: Float64Array,
  fail: Fail): [string, string][] {
  const k = states.length;
  const index = new Map(states.map((s, i) => [s, i] as const));
  const mask = new Uint8Array(k * k);
  const out = pairs.map(([rawFrom, rawTo], n): [string, string] => {
    const [from, to] = [normaliseLabel(rawFrom), normaliseLabel(rawTo)];
    const i = index.get(from);
    const j = index.get(to);
    if (i === undefined) fail(`impossible transition names unknown state ${quote(from)}`, ['impossible', n, 0]);
    if (j === undefined) fail(`impossible transition names unknown state ${quote(to)}`, ['impossible', n, 1]);
    if (mask[i! * k + j!]) fail(`impossible transition ${quote(`${from}>${to}`)} is listed twice`, ['impossible', n]);
    mask[i! * k + j!] = 1;
    if (counts[i! * k + j!]! > 0) {
      fail(`transition ${quote(`${from}>${to}`)} is declared impossible but counted ${counts[i! * k + j!]} times`, ['counts', i!, j!]);
    }
    return [from, to];
  });
  for (let i = 0; i < k; i++) {
    if (mask.subarray(i * k, (i + 1) * k).every((m) => m === 1)) {
      fail(`every transition out of ${quote(states[i]!)} is declared impossible`, ['impossible']);
    }
  }
  return out;
}

function checkTimes(f: FitBody, fail: Fail): void {
  if (f.data.first_time > f.latest.time) {
    fail(`the first survey time ${f.data.first_time} is after the latest, ${f.latest.time}`, ['data', 'first_time']);
  }
  // Transitions join surveys one step apart, so a step longer than the whole record counted none.
  if (f.step > f.latest.time - f.data.first_time) {
    fail(`step ${f.step} is longer than the surveys span (${f.data.first_time}–${f.latest.time})`, ['step']);
  }
  const gaps = new Set<number>();
  f.data.skipped_pairs.forEach(({ gap }, n) => {
    if (gap === f.step || gaps.has(gap)) fail(`skipped gap ${gap} is the step or listed twice`, ['data', 'skipped_pairs', n, 'gap']);
    gaps.add(gap);
  });
}

function checkLatest(latest: FitBody['latest'], k: number, fail: Fail): void {
  if (latest.counts.length !== k) fail(`latest.counts has ${latest.counts.length} entries for ${k} states`, ['latest', 'counts']);
  const total = latest.counts.reduce((a, b) => a + b, 0);
  // The start shares are counts / sites: any other total would make shares that do not sum to 1.
  if (total !== latest.sites) fail(`latest.counts add up to ${total} sites, but latest.sites is ${latest.sites}`, ['latest', 'sites']);
  (latest.carried ?? []).forEach(({ state }, n) => { if (state >= k) fail(`state index out of range (${k} states)`, ['latest', 'carried', n, 'state']); });
}

function checkSites(f: FitBody, k: number, counts: Float64Array, fail: Fail): SiteCountTable | number {
  if (f.site_counts === null) {
    // Pooled counts (a fit from a counts table without per-site counts): only how many sites.
    if (f.data.sites === undefined || f.data.sites < 1) fail('a fit without site_counts needs data.sites, the number of sites', ['data', 'sites']);
    return f.data.sites;
  }
  const seen = new Map<string, number>();
  const fromSites = new Float64Array(k * k);
  const grouped = f.group_column !== undefined && f.group_column !== null;
  const sites = f.site_counts.map((s, n): SiteCountsJson => {
    const site = normaliseLabel(s.site);
    const problem = labelProblem(site, () => `site ${quote(site)}`);
    if (problem) fail(problem.what, ['site_counts', n, 'site'], problem.hint);
    const first = seen.get(site);
    if (first !== undefined) fail(`site ${quote(site)} is listed twice (also site_counts[${first}])`, ['site_counts', n, 'site']);
    seen.set(site, n);
    if (grouped && s.group === undefined) fail(`site ${quote(site)} has no group, but the fit has a group column`, ['site_counts', n]);
    if (!grouped && s.group !== undefined) fail(`site ${quote(site)} has a group, but the fit has no group_column`, ['site_counts', n, 'group']);
    s.cells.forEach(([i, j], c) => { if (i >= k || j >= k) fail(`state index out of range (${k} states)`, ['site_counts', n, 'cells', c]); });
    addSiteCells(fromSites, k, s.cells);
    const cells = s.cells.map(([i, j, x]) => [i, j, x] as const);
    return s.group === undefined ? { site, cells } : { site, group: normaliseLabel(s.group), cells };
  });
  if (fromSites.some((x, c) => x !== counts[c])) fail('site_counts do not add up to counts', ['site_counts']);
  // The bootstrap draws sites by position: the canonical order makes a reordered file give the same draws.
  return SiteCountTable.fromList(k, sites.sort((a, b) => compareCodePoints(a.site, b.site)));
}

function checkPeriods(f: FitBody, k: number, counts: Float64Array, fail: Fail): void {
  if (!f.period_counts) return;
  const sum = new Float64Array(k * k);
  const times = new Set<number>();
  f.period_counts.forEach((p, n) => {
    if (times.has(p.time)) fail(`period ${p.time} is listed twice`, ['period_counts', n, 'time']);
    times.add(p.time);
    if (p.time < f.data.first_time || p.time + f.step > f.latest.time) {
      fail(`period ${p.time} starts outside the surveys (${f.data.first_time}–${f.latest.time - f.step})`, ['period_counts', n, 'time']);
    }
    p.cells.forEach(([i, j], c) => { if (i >= k || j >= k) fail(`state index out of range (${k} states)`, ['period_counts', n, 'cells', c]); });
    addSiteCells(sum, k, p.cells);
  });
  if (sum.some((x, c) => x !== counts[c])) fail('period_counts do not add up to counts', ['period_counts']);
}

function checkTriples(f: FitBody, k: number, counts: Float64Array, fail: Fail): void {
  if (!f.order2_counts) return;
  const ends = new Float64Array(k * k);
  f.order2_counts.forEach(([i, j, l, n], c) => {
    if (i >= k || j >= k || l >= k) fail(`state index out of range (${k} states)`, ['order2_counts', c]);
    ends[j * k + l] += n;
  });
  // Each run of three ends in a one-step transition j→l, so no more runs end in j→l than there are j→l transitions.
  ends.forEach((x, c) => {
    if (x > counts[c]!) fail(`order2_counts hold ${x} runs ending in a transition counted ${counts[c]} times`, ['order2_counts']);
  });
}

/**
 * Pairs by gap: indices in range, gaps of two or more steps, each cell once, in (gap, from, to)
 * order, and each possible in that many steps under the structural zeros (else no matrix the fit
 * may return explains it, and EM would divide by zero).
 */
function checkGapCounts(f: FitBody, states: readonly string[], mask: Uint8Array, fail: Fail, errors = false): GapCell[] {
  const k = states.length;
  const cells = f.data.gap_counts ?? [];
  let previous = -1;
  cells.forEach(([i, j, g, n], c) => {
    if (i >= k || j >= k) fail(`state index out of range (${k} states)`, ['data', 'gap_counts', c]);
    if (g < 2) fail(`gap ${g} is not two or more steps (one-step pairs belong in counts)`, ['data', 'gap_counts', c, 2]);
    if (n === 0) fail('a cell with no pairs is left out, not listed as 0', ['data', 'gap_counts', c, 3]);
    const order = (g * k + i) * k + j;
    if (order <= previous) fail('cells are listed twice or out of (gap, from, to) order', ['data', 'gap_counts', c]);
    previous = order;
  });
  // With observer error an unreachable recorded pair is evidence of mislabelling, not a broken file.
  const reach = errors ? undefined : reachableInSteps(mask, k, maxGap(cells));
  cells.forEach(([i, j, g], c) => {
    if (reach && !reach[g]![i * k + j]) {
      fail(`pairs ${g} steps apart from ${quote(states[i]!)} to ${quote(states[j]!)} are impossible under the impossible list`, ['data', 'gap_counts', c]);
    }
  });
  return cells.map(([i, j, g, n]) => [i, j, g, n] as const);
}

function checkPairsByGap(f: FitBody, transitions: number, gapCounts: readonly GapCell[], fail: Fail): PairsByGap[] {
  // transitions > 0 is checked first, so gap 1 always leads, as the file lists it.
  const pairs = pairsByGapOf(transitions, gapCounts);
  const given = f.data.pairs_by_gap;
  if (given !== undefined && JSON.stringify(given.map(({ gap, pairs: n }) => ({ gap, pairs: n }))) !== JSON.stringify(pairs)) {
    fail('pairs_by_gap does not agree with counts and gap_counts', ['data', 'pairs_by_gap']);
  }
  return pairs;
}

/**
 * The sampler's retained latent counts: one k×k table of whole numbers per retained sweep, zero on
 * structural zeros, each holding exactly g one-step transitions per pair g steps apart (a bridge of g
 * steps is g transitions). Only a fit with gaps has them.
 */
function checkSampler(f: FitBody, states: readonly string[], mask: Uint8Array,
  gapCounts: readonly GapCell[], fail: Fail, trueTransitions?: number): LatentSample | undefined {
  const s = f.posterior_sampler;
  if (s === undefined || s === null) return undefined;
  const k = states.length;
  if (gapCounts.length === 0 && trueTransitions === undefined) fail('posterior_sampler is only for fits with pairs further apart than one step or observer error', ['posterior_sampler']);
  if (s.latent_counts.length !== s.retained) fail(`latent_counts holds ${s.latent_counts.length} sweeps, not retained = ${s.retained}`, ['posterior_sampler', 'latent_counts']);
  // With observer error a sweep holds every transition of the true paths; otherwise those inside the gaps.
  const steps = trueTransitions ?? gapCounts.reduce((a, [, , g, n]) => a + g * n, 0);
  const latent = new Float64Array(s.retained * k * k);
  s.latent_counts.forEach((sweep, r) => {
    if (sweep.length !== k * k) fail(`a sweep has ${sweep.length} cells, not ${k * k}`, ['posterior_sampler', 'latent_counts', r]);
    let total = 0;
    sweep.forEach((x, c) => {
      if (x > 0 && mask[c]) fail('a latent count falls on a transition declared impossible', ['posterior_sampler', 'latent_counts', r, c]);
      total += x;
    });
    if (total !== steps) fail(`a sweep holds ${total} one-step transitions, not the ${steps} inside the gapped pairs`, ['posterior_sampler', 'latent_counts', r]);
    latent.set(sweep, r * k * k);
  });
  const grid = (rows: (number | null)[][], key: string): Float64Array => {
    if (rows.length !== k || rows.some((row) => row.length !== k)) fail(`${key} is not ${k}×${k}`, ['posterior_sampler', key]);
    return Float64Array.from(rows.flat(), (x) => (x === null ? Number.NaN : x));
  };
  return { seed: s.seed, chains: s.chains, warmUp: s.warm_up, thin: s.thin ?? 1, retained: s.retained, latent, rhat: grid(s.rhat, 'rhat'), ess: grid(s.ess, 'ess') };
}

/** Each site's gapped pairs: known sites, in range, adding up to gap_counts; a table aligned with the sites. */
function checkSiteGaps(f: FitBody, k: number, sites: SiteCountTable, gapCounts: readonly GapCell[], fail: Fail): SiteCountTable | undefined {
  const rows = f.site_gap_counts;
  if (rows === undefined || (rows.length === 0 && gapCounts.length > 0)) return undefined;
  const position = new Map(sites.ids.map((id, s) => [id, s] as const));
  const bySite = sites.ids.map(() => new Map<number, number>());
  const sum = new Map<string, number>();
  rows.forEach(([rawSite, i, j, g, n], c) => {
    const s = position.get(normaliseLabel(rawSite));
    if (s === undefined) fail(`site ${quote(rawSite)} is not in site_counts`, ['site_gap_counts', c, 0]);
    if (i >= k || j >= k || g < 2 || n === 0) fail('not [site, from, to, gap ≥ 2, n ≥ 1] within the states', ['site_gap_counts', c]);
    const wide = (g - 2) * k * k + i * k + j;
    bySite[s!]!.set(wide, (bySite[s!]!.get(wide) ?? 0) + n);
    sum.set(`${i},${j},${g}`, (sum.get(`${i},${j},${g}`) ?? 0) + n);
  });
  if (sum.size !== gapCounts.length || gapCounts.some(([i, j, g, n]) => sum.get(`${i},${j},${g}`) !== n)) {
    fail('site_gap_counts do not add up to data.gap_counts', ['site_gap_counts']);
  }
  const builder = new SiteCountBuilder(k, false);
  bySite.forEach((cells, s) => {
    for (const wide of [...cells.keys()].sort((a, b) => a - b)) builder.cell(wide, cells.get(wide)!);
    builder.endSite(sites.ids[s]!, undefined);
  });
  return builder.table();
}

/**
 * A zoned fit's zones against its pooled fit: the same states (in order), step, prior and
 * structural zeros; each zone with sites; names distinct; the zones' one-step counts adding up to
 * the pooled counts (every site in exactly one zone); two zones at least for partial pooling.
 */
export function checkZones(fit: Fit, zones: FitZones, fail: Fail): FitZones {
  const at = (z: number, key: string): (string | number)[] => ['zones', 'zones', z, 'fit', key];
  if (fit.groupColumn !== undefined && zones.column !== fit.groupColumn) {
    fail(`zones.column ${quote(zones.column)} is not the fit's group_column ${quote(fit.groupColumn)}`, ['zones', 'column']);
  }
  if (zones.pooling === 'partial' && zones.zones.length < 2) fail('partial pooling needs at least two zones', ['zones', 'zones']);
  const k = fit.states.length;
  const sum = new Float64Array(k * k);
  const seen = new Set<string>();
  zones.zones.forEach((zone, z) => {
    if (seen.has(zone.name)) fail(`zone ${quote(zone.name)} is listed twice`, ['zones', 'zones', z, 'name']);
    seen.add(zone.name);
    const f = zone.fit;
    if (f.states.join('\u0000') !== fit.states.join('\u0000')) fail(`zone ${quote(zone.name)} has other states than the fit`, at(z, 'states'));
    if (f.step !== fit.step) fail(`zone ${quote(zone.name)} has step ${f.step}, the fit ${fit.step}`, at(z, 'step'));
    if (String(f.prior) !== String(fit.prior)) fail(`zone ${quote(zone.name)} has another prior than the fit`, at(z, 'prior'));
    if (JSON.stringify(f.impossible) !== JSON.stringify(fit.impossible)) fail(`zone ${quote(zone.name)} has other impossible transitions than the fit`, at(z, 'impossible'));
    if ((f.pooledSites ?? f.sites.length) === 0) fail(`zone ${quote(zone.name)} has no sites`, at(z, 'site_counts'), 'remove the zone, or refit from the survey table');
    for (let c = 0; c < k * k; c++) sum[c] += f.counts[c]!;
  });
  for (let c = 0; c < k * k; c++) {
    if (sum[c] !== fit.counts[c]) {
      fail(`the zones' counts from ${quote(fit.states[Math.floor(c / k)]!)} to ${quote(fit.states[c % k]!)} add up to ${sum[c]}, the fit's to ${fit.counts[c]}`,
        ['zones', 'zones'], 'every site belongs to exactly one zone: refit from the survey table');
    }
  }
  return zones;
}
