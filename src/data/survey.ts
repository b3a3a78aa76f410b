/** One survey record: the state a site was found in at a time. `line` is the CSV line it came from. */
export interface SurveyRecord {
  readonly site: string;
  readonly time: number;
  /** Index into the survey table's `states`. */
  readonly state: number;
  readonly group?: string;
  readonly line: number;
}

/** A validated survey table: states in their final order, records in file order. */
export interface SurveyTable {
  readonly file: string;
  readonly states: readonly string[];
  readonly records: readonly SurveyRecord[];
  /** Rows that repeated an earlier (site, time, state) exactly; counted, used once. */
  readonly repeatedRows: number;
  /** SHA-256 of the file's bytes, so a record can prove which data it came from. */
  readonly sha256: string;
}

/** Which CSV columns hold what. */
export interface SurveyColumns {
  readonly site: string;
  readonly time: string;
  readonly state: string;
  readonly group?: string;
}

export const DEFAULT_COLUMNS: SurveyColumns = { site: 'site', time: 'time', state: 'state' };
