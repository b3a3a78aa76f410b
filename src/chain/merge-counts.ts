import { SereError, quote } from '../errors.js';
import { isLastSurvey, sortCells, sortSiteCells, type CountCell, type CountsTable, type SiteCell } from '../data/counts-table.js';
import { StateLabels } from '../data/states.js';

/**
 * Counts of several shards as one table: the counts add up, cell by cell. This is exact when the
 * shards hold disjoint sets of sites — every pair of a site's consecutive surveys is then in one
 * shard. A site in two shards would lose the pair that spans them and count its sites twice, so
 * with per-site counts (which name the sites) it is refused; without them it cannot be seen, and
 * the README says to split by site. States are the declared ones (each shard was read with them)
 * or the union, sorted, with look-alike spellings refused as for several survey tables. Last-survey
 * rows are kept only when every shard has them (a shard counted before they existed has none, and
 * the others' alone would not count every site).
 */
export function mergeCounts(tables: readonly CountsTable[], declared: boolean): CountsTable {
  if (tables.length === 1) return tables[0]!;
  const files = tables.map((t) => t.file).join(', ');
  const first = tables[0]!;
  for (const t of tables) {
    if (t.step !== first.step) {
      throw new SereError('BAD_COUNTS', `counted with steps of ${t.step} time units, but ${first.file} with ${first.step}`, { file: t.file },
        'count every shard with the same --step');
    }
    if (t.grouped !== first.grouped) {
      throw new SereError('BAD_COUNTS', `${t.grouped ? 'has' : 'has no'} site_group column, but ${first.file} ${first.grouped ? 'has' : 'has not'}`, { file: t.file },
        'count every shard with the same --group-column');
    }
    if ((t.siteCells !== undefined) !== (first.siteCells !== undefined)) {
      throw new SereError('BAD_COUNTS', `${t.siteCells ? 'has' : 'has no'} per-site counts, but ${first.file} ${first.siteCells ? 'has' : 'has not'}`, { file: t.file },
        'count every shard with --per-site, or none');
    }
  }
  let states = first.states;
  if (!declared) {
    const labels = new StateLabels(files, undefined, 2);
    for (const t of tables) for (const s of t.states) labels.see(s, 0, 0);
    states = labels.finish().states;
  } else if (tables.some((t) => t.states.join('\n') !== first.states.join('\n'))) {
    throw new Error('shards read with declared states must share them');
  }
  const index = new Map(states.map((s, i) => [s, i] as const));
  const cells = new Map<string, CountCell>();
  const siteCells: SiteCell[] = [];
  const siteShard = new Map<string, string>();
  const keepLast = tables.every((t) => t.cells.some(isLastSurvey));
  for (const t of tables) {
    const to = (i: number): number => (i < 0 ? i : index.get(t.states[i]!)!);
    for (const c of t.cells) {
      if (!keepLast && isLastSurvey(c)) continue;
      const from = to(c.from);
      const key = `${c.group ?? ''}\u0000${from} ${to(c.to)} ${c.gap} ${c.time}`;
      const earlier = cells.get(key);
      cells.set(key, earlier ? { ...earlier, n: earlier.n + c.n } : { ...c, from, to: to(c.to), line: 0 });
    }
    for (const c of t.siteCells ?? []) {
      const other = siteShard.get(c.site);
      if (other !== undefined && other !== t.file) {
        throw new SereError('SITE_IN_TWO_SHARDS', `site ${quote(c.site)} is in this shard and in ${other}`, { file: t.file, line: c.line },
          "split the survey table by site, so that all of a site's surveys are counted in one shard");
      }
      siteShard.set(c.site, t.file);
      siteCells.push({ ...c, from: to(c.from), to: to(c.to), line: 0 });
    }
  }
  sortSiteCells(siteCells);
  return {
    file: files, sha256: '', states, step: first.step, grouped: first.grouped,
    cells: sortCells([...cells.values()]),
    ...(first.siteCells ? { siteCells } : {}),
    repeatedRows: tables.reduce((n, t) => n + t.repeatedRows, 0),
  };
}
