import { sortByCodePoints } from './code-points.js';
import { orderRows } from './order-rows.js';
import { RowStore } from './row-store.js';
import type { SurveyRecord, SurveyRows, SurveyTable } from './survey.js';
import { DEFAULT_OBSERVER_COLUMN } from './survey-header.js';

/** The rows for which `keep(n)` holds, in the same order, with the same sites, states and groups. */
export function selectRows(table: SurveyTable, keep: (n: number) => boolean): SurveyTable {
  const { rows } = table;
  const chosen: number[] = [];
  for (let n = 0; n < rows.count; n++) if (keep(n)) chosen.push(n);
  const pick = <T extends Int32Array | Float64Array | Uint8Array>(column: T): T => {
    const out = new (column.constructor as new (length: number) => T)(chosen.length);
    chosen.forEach((n, p) => { out[p] = column[n]!; });
    return out;
  };
  const selected: SurveyRows = {
    count: chosen.length, site: pick(rows.site), time: pick(rows.time), state: pick(rows.state), line: pick(rows.line),
    ...(rows.group ? { group: pick(rows.group) } : {}),
    ...(rows.observer ? { observer: pick(rows.observer) } : {}),
  };
  return { ...table, rows: selected };
}

/** The distinct groups that have rows, sorted (code-unit order, as group names always were). */
export function groupsWithRows(table: SurveyTable): string[] {
  const { rows, groups } = table;
  if (!rows.group || !groups) return [];
  const seen = new Uint8Array(groups.length);
  for (let n = 0; n < rows.count; n++) seen[rows.group[n]!] = 1;
  return groups.filter((_, g) => seen[g] === 1).sort();
}

/**
 * A table from records made in memory (simulated surveys, tests), with the states given. The
 * records must be unique by (site, time); groups are kept when every record has one.
 */
export function tableFromRecords(file: string, states: readonly string[], records: readonly SurveyRecord[], sha256 = ''): SurveyTable {
  const sites = sortByCodePoints([...new Set(records.map((r) => r.site))]);
  const siteIndex = new Map(sites.map((s, i) => [s, i] as const));
  const grouped = records.length > 0 && records.every((r) => r.group !== undefined);
  const groups = grouped ? [...new Set(records.map((r) => r.group!))] : undefined;
  const groupIndex = new Map(groups?.map((g, i) => [g, i] as const));
  // Observers likewise (observer error): kept when every record names one.
  const observed = records.length > 0 && records.every((r) => r.observer !== undefined);
  const observers = observed ? [...new Set(records.map((r) => r.observer!))] : undefined;
  const observerIndex = new Map(observers?.map((o, i) => [o, i] as const));
  const store = new RowStore(grouped, observed);
  for (const r of records) {
    store.push(siteIndex.get(r.site)!, r.time, r.state, r.line, grouped ? groupIndex.get(r.group!)! : 0, observed ? observerIndex.get(r.observer!)! : 0);
  }
  const ordered = orderRows(store, sites.length);
  if (ordered.conflict || ordered.repeated > 0) throw new Error('internal: records repeat a (site, time)');
  // Positions are kept when every record has one (a site's last record's, for tables made in memory).
  const placed = records.length > 0 && records.every((r) => r.x !== undefined && r.y !== undefined);
  const positions = placed ? new Float64Array(2 * sites.length) : undefined;
  if (positions) for (const r of records) positions.set([r.x!, r.y!], 2 * siteIndex.get(r.site)!);
  return {
    file, states, sites, rows: ordered.rows, repeatedRows: 0, sha256, ...(groups ? { groups } : {}), ...(positions ? { positions } : {}),
    ...(observers ? { observers, observerColumn: { name: DEFAULT_OBSERVER_COLUMN } } : {}),
  };
}

/**
 * Every row as a record, in the table's order: for the per-site scoring of hindcasts and seasons,
 * which walk each site's surveys (an object per row; not for the counting path).
 */
export function recordsOf(table: SurveyTable): SurveyRecord[] {
  return Array.from({ length: table.rows.count }, (_, n) => recordAt(table, n));
}

/** Row n as a record: for tests and messages, never for a loop over a whole table. */
export function recordAt(table: SurveyTable, n: number): SurveyRecord {
  const { rows } = table;
  const record = { site: table.sites[rows.site[n]!]!, time: rows.time[n]!, state: rows.state[n]!, line: rows.line[n]! };
  return rows.group && table.groups ? { ...record, group: table.groups[rows.group[n]!]! } : record;
}
