import { SereError } from '../errors.js';
import type { KeyPath } from '../data/read-structured.js';
import { readJsonStructured } from '../data/read-json.js';
import type { Fit } from './fit.js';
import { SiteCountTable } from '../chain/site-counts.js';
import { fitFileSchema } from './fit-file-schema.js';
import { checkFitFile, checkZones, type Fail } from './check-fit-file.js';
import type { FitBody } from './fit-file-schema.js';

/** Read a fit written by `sere fit --out`, checking every invariant the engine relies on (check-fit-file.ts). */
export function loadFit(file: string): Fit {
  const { value: f, locate } = readJsonStructured(file, fitFileSchema, 'fit file', 'BAD_FIT_FILE');
  const fail = (what: string, path: KeyPath, hint = 'refit from the survey table with sere fit'): never => {
    throw new SereError('BAD_FIT_FILE', what, locate(path), hint);
  };
  const fit = fitOfFile(f, fail);
  if (!f.zones) return fit;
  const zones = f.zones.zones.map((zone, z) => ({
    name: zone.name,
    fit: fitOfFile(zone.fit, (what, path, hint) => fail(what, ['zones', 'zones', z, 'fit', ...path], hint)),
  }));
  return { ...fit, zones: checkZones(fit, { column: f.zones.column, pooling: f.zones.pooling, zones }, fail) };
}

/** A fit from a fit file's keys (the whole file, or one zone's `fit`), every invariant checked. */
function fitOfFile(f: FitBody, fail: Fail): Fit {
  const checked = checkFitFile(f, fail);
  const prior = f.prior.name === 'jeffreys' || f.prior.name === 'uniform' ? f.prior.name : f.prior.pseudo_count;
  return {
    input: f.input,
    states: checked.states,
    step: f.step,
    prior,
    impossible: checked.impossible,
    counts: checked.counts,
    ...(typeof checked.sites === 'number'
      ? { sites: SiteCountTable.fromList(checked.states.length, []), pooledSites: checked.sites }
      : { sites: checked.sites }),
    transitions: checked.transitions,
    skipped: f.data.skipped_pairs,
    gapCounts: checked.gapCounts,
    pairsByGap: checked.pairsByGap,
    latentSample: checked.latentSample,
    siteGaps: checked.siteGaps,
    singleSurveySites: f.data.single_survey_sites ?? undefined,
    repeatedRows: f.data.repeated_rows,
    surveys: f.data.surveys,
    firstTime: f.data.first_time,
    latest: {
      time: f.latest.time, counts: f.latest.counts, sites: f.latest.sites, shares: f.latest.counts.map((c) => c / f.latest.sites),
      carried: f.latest.carried, notCarried: f.latest.not_carried,
    },
    triples: f.order2_counts ?? undefined,
    periods: f.period_counts ?? undefined,
    groupColumn: f.group_column ?? undefined,
    ...checked.spatial,
    // A raster fit's site_counts are its blocks: the pixels it rests on are data.sites.
    ...(checked.spatial.blockSites ? { pooledSites: f.data.sites ?? checked.spatial.blockSites.reduce((a, b) => a + b, 0) } : {}),
    ...(checked.errorModel ? { errorModel: checked.errorModel } : {}),
  };
}
