import { InvalidArgumentError, type Command } from 'commander';
import { extname } from 'node:path';
import { statSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { SereError, quote } from '../errors.js';
import { isCountsFile, type CountsTable } from '../data/counts-table.js';
import { readCountsCsv } from '../data/read-counts-csv.js';
import { readSurveyTables } from '../data/read-survey-tables.js';
import { hashFile } from '../data/hash-file.js';
import { tallyCounts } from '../chain/tally-counts.js';
import { mergeCounts } from '../chain/merge-counts.js';
import { likelyTypos } from '../data/label-typos.js';
import { countsCsv, countsSources, type CountsInput } from '../data/counts-csv.js';
import type { SurveyColumns } from '../data/survey.js';
import type { Io } from './io.js';
import { commaList, yearsFlag } from './parse-options.js';
import { refuseExisting, writeFilesAtomic } from './write-file.js';
import { DEFAULT_STEP } from './fit-options.js';
import { progressReporter } from './progress.js';

interface CountOptions {
  out?: string;
  force?: boolean;
  perSite?: boolean;
  engine: 'auto' | 'in-process' | 'duckdb';
  sql?: boolean;
  table: string;
  step?: number;
  states?: string[];
  siteColumn: string;
  timeColumn: string;
  stateColumn: string;
  groupColumn?: string;
}

/**
 * Survey tables larger than this are counted by DuckDB under `--engine auto`. Measured with
 * `npm run bench -- count` on 10⁷ rows (159 MB of CSV): in-process 3.7 s of CPU at a peak of
 * 587 MB, DuckDB 7.0 s at 648 MB. The in-process counter is the faster, but its memory grows with
 * the rows (about 58 bytes a row at the peak); DuckDB's does not (it spills to disk). At 256 MiB,
 * some 1.7·10⁷ rows, the in-process peak is about 1 GB.
 */
export const DUCKDB_THRESHOLD_BYTES = 256 * 1024 ** 2;

export function registerCount(program: Command, io: Io): void {
  program.command('count')
    .description('count transitions into a counts table (the sufficient statistics sere fit reads), from survey tables, Parquet files or counts shards')
    .argument('[inputs...]', 'survey tables (.csv, .parquet) counted as one; counts tables (told by their header) added in as shards')
    .option('--out <counts.csv>', 'write the counts table here, with NAME.sources.json beside it (never overwrites without --force)')
    .option('--force', 'replace existing --out files')
    .option('--per-site', "also write each site's counts (the site bootstrap and the groups test need them)")
    .option('--engine <name>', `in-process, duckdb, or auto (DuckDB for Parquet and tables over ${DUCKDB_THRESHOLD_BYTES / 1024 ** 2} MiB)`, engineFlag, 'auto')
    .option('--sql', 'print the counting query as portable SQL (for Spark SQL, Trino, a warehouse) instead of counting')
    .option('--table <name>', 'the table the --sql query reads', 'surveys')
    .option('--step <n>', "time units one step spans (surveys every 5 years: 5; default 1, or the shards' own)", yearsFlag)
    .option('--states <a,b,c>', 'the states, in the order to report them; other labels are errors', commaList)
    .option('--site-column <name>', 'column holding the site', 'site')
    .option('--time-column <name>', 'column holding the survey time (whole numbers)', 'time')
    .option('--state-column <name>', 'column holding the state', 'state')
    .option('--group-column <name>', 'optional column holding a group (soil type, management unit)')
    .action(async (inputs: string[], given: CountOptions) => {
      // Counts tables alone keep their own step unless --step says otherwise (then it must match).
      const shards = inputs.filter((f) => isCountsFile(f));
      const firstShard = given.step === undefined && inputs.length > 0 && shards.length === inputs.length
        ? readCountsCsv(inputs[0]!, { states: given.states }) : undefined;
      const opts = { ...given, step: given.step ?? firstShard?.step ?? DEFAULT_STEP };
      if (opts.out !== undefined) refuseExisting([opts.out, sidecarName(opts.out)], Boolean(opts.force));
      const columns: SurveyColumns = { site: opts.siteColumn, time: opts.timeColumn, state: opts.stateColumn, group: opts.groupColumn };
      if (opts.sql) {
        const { countingSql } = await import('../sql/count-query.js');
        io.stdout(countingSql({ table: opts.table, columns, step: opts.step, perSite: Boolean(opts.perSite) }));
        return;
      }
      if (inputs.length === 0) {
        throw new SereError('BAD_OPTION', 'no input to count', { path: 'INPUT' }, 'name one or more survey tables or counts tables, or use --sql');
      }
      const surveys = inputs.filter((f) => !shards.includes(f));
      const parquet = surveys.filter((f) => extname(f).toLowerCase() === '.parquet');
      const useDuckDb = opts.engine === 'duckdb' || parquet.length > 0
        || (opts.engine === 'auto' && surveys.some((f) => sizeOf(f) > DUCKDB_THRESHOLD_BYTES));
      if (parquet.length > 0 && opts.engine === 'in-process') {
        throw new SereError('BAD_OPTION', 'Parquet files are counted by DuckDB', { file: parquet[0]!, path: '--engine' }, 'drop --engine in-process, or convert the file to CSV');
      }
      const tables: CountsTable[] = [];
      const notes: string[] = [];
      const sources: CountsInput[] = [];
      if (surveys.length > 0) {
        let counted: CountsTable;
        if (useDuckDb) {
          const { countWithDuckDb } = await import('../sql/duckdb-count.js');
          const bar = progressReporter(io.progress, 'counting', 'percent');
          try {
            counted = await countWithDuckDb(surveys, { columns, step: opts.step, states: opts.states, perSite: Boolean(opts.perSite),
              onProgress: (fraction) => bar.update(Math.round(fraction * 100), 100) });
          } finally {
            bar.stop();
          }
        } else {
          const table = readSurveyTables(surveys, { columns, states: opts.states });
          counted = tallyCounts(table, { step: opts.step, perSite: Boolean(opts.perSite) });
          // The warning sere fit gives on a survey table: a fit from the counts cannot see the rows.
          for (const t of likelyTypos(table)) {
            notes.push(`check state '${t.label}' (${t.rows} row${t.rows === 1 ? '' : 's'}, first on line ${t.line}): a slip for '${t.near}' (${t.nearRows} rows)? ` +
              'Correct it, or declare the states with --states if both are real');
          }
          if (surveys.length === 1) sources.push({ file: surveys[0]!, sha256: table.sha256, kind: 'survey table' });
        }
        if (sources.length === 0) for (const f of surveys) sources.push({ file: f, sha256: hashFile(f, 'survey table'), kind: 'survey table' });
        tables.push(counted);
      }
      for (const f of shards) {
        // The first shard was read already when it gave the step.
        const shard = f === inputs[0] && firstShard ? firstShard : readCountsCsv(f, { states: opts.states });
        if (shard.step !== opts.step) {
          throw new SereError('BAD_COUNTS', `this shard was counted with steps of ${shard.step} time unit${shard.step === 1 ? '' : 's'}, not ${opts.step}`, { file: f, path: '--step' },
            `count with --step ${shard.step}, or count that shard again with --step ${opts.step}`);
        }
        // Shards add up, so the same counts given twice would count every transition twice (a survey
        // table given twice is safe: its repeated rows are exact duplicates, each used once).
        const same = sources.find((s) => s.kind === 'counts table' && s.sha256 === shard.sha256);
        if (same) {
          throw new SereError('BAD_COUNTS', `this counts table has the same content (SHA-256) as ${quote(same.file)}: adding it would count every transition twice`, { file: f },
            'give each shard once');
        }
        tables.push(shard);
        sources.push({ file: f, sha256: shard.sha256, kind: 'counts table' });
      }
      const merged = mergeCounts(tables, opts.states !== undefined);
      if (merged.repeatedRows > 0) notes.push(`repeated rows: ${merged.repeatedRows} exact duplicates, each used once`);
      // Printed when the command succeeds (run.ts holds notices), so a failing run's stderr is its one error line.
      for (const note of notes) (io.notice ?? io.stderr)(`sere: ${note}\n`);
      const csv = countsCsv(merged);
      if (opts.out === undefined) {
        io.stdout(csv);
        return;
      }
      const sidecar = sidecarName(opts.out);
      const sha256 = createHash('sha256').update(csv).digest('hex');
      const json = JSON.stringify(countsSources(merged, opts.out, sha256, sources, useDuckDb ? 'duckdb' : 'in-process'), null, 2) + '\n';
      writeFilesAtomic([{ file: opts.out, text: csv }, { file: sidecar, text: json }], Boolean(opts.force));
      io.stderr(`wrote ${opts.out} (${merged.cells.length} rows${merged.siteCells ? ` and ${merged.siteCells.length} per-site rows` : ''}) and ${sidecar}\n`);
    });
}

/** counts.csv → counts.sources.json: the inputs' hashes and the totals, beside the table. */
export function sidecarName(out: string): string {
  return `${out.replace(/\.csv$/i, '')}.sources.json`;
}

function engineFlag(value: string): CountOptions['engine'] {
  if (value === 'auto' || value === 'in-process' || value === 'duckdb') return value;
  throw new InvalidArgumentError('expected in-process, duckdb or auto.');
}

function sizeOf(file: string): number {
  try {
    return statSync(file).size;
  } catch {
    return 0;
  }
}
