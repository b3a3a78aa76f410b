import { existsSync, readFileSync } from 'node:fs';
import { basename, dirname, join, relative } from 'node:path';
import { InvalidArgumentError, type Command } from 'commander';
import { SereError, formatError } from '../errors.js';
import { loadWorkspace, workspaceRoot, WORKSPACE_FILE } from '../workspace/workspace.js';
import { runSeason } from '../workspace/season.js';
import { freeRecordName, listRecords, writeFolderAtomic } from '../workspace/record-folder.js';
import { readRecord, type StoredRecord } from '../workspace/read-record.js';
import { prepareRecordsFolder, withRecordsLock } from '../workspace/records-lock.js';
import { initWorkspace } from '../workspace/init.js';
import { initWorkspaceFrom } from '../workspace/init-from.js';
import { FIT_FLAG_KEYS, fitSettingsFrom, withFitOptions, type FitFlags } from './fit-options.js';
import { seasonTable } from '../report/season-table.js';
import { recordFiles } from '../report/record-files.js';
import { makeStyle } from '../report/style.js';
import { freshSeed } from '../uncertainty/random.js';
import type { Io } from './io.js';

function isoDate(value: string): string {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(value) || Number.isNaN(Date.parse(value))) throw new InvalidArgumentError('expected a date as YYYY-MM-DD.');
  return value;
}

export function registerSeason(program: Command, io: Io): void {
  const init = withFitOptions(program.command('init')
    .description('create a workspace, ready for sere season: from your own survey table (--from), or holding the invented demo')
    .argument('<folder>', 'a new or empty folder')
    .option('--from <survey.csv>', 'start from this survey table: fit it with the fit flags and add a do-nothing scenario')
    .option('--zoned', 'the demo by zone: three zones partially pooled, forecast stratified by zone with year-to-year variation'));
  init.action((folder: string, opts: FitFlags & { from?: string; zoned?: boolean }) => {
    // The fit flags describe --from's table; on the demo they would be silently ignored.
    const given = FIT_FLAG_KEYS.filter((key) => init.getOptionValueSource(key) === 'cli');
    if (!opts.from && given.length > 0) init.error('error: the fit flags describe a survey table: give it with --from SURVEY.csv', { exitCode: 2 });
    if (opts.from && opts.zoned) init.error('error: --zoned makes the zoned demo; with --from, name the zone column (--group-column) and --pooling partial', { exitCode: 2 });
    let files: string[];
    if (opts.from) {
      const seed = freshSeed();
      files = initWorkspaceFrom(folder, opts.from, fitSettingsFrom(opts), seed);
      io.stderr(`seed ${seed} (kept in the workspace file, so every season draws the same random numbers)\n`);
    } else {
      files = initWorkspace(folder, opts.zoned ? 'zoned' : 'pooled');
    }
    io.stdout(`created ${folder} with ${files.length} files: ${files.join(', ')}\nnext: sere season ${folder}   (from the project folder: npx sere season ${folder})\n`);
  });

  program.command('season')
    .description("every season: refit, rerun every scenario and comparison, write a dated record, say what changed")
    .argument('[folder]', 'the workspace folder (holding sere-workspace.yaml); default: here')
    .option('--date <YYYY-MM-DD>', "the record's date (default: today)", isoDate)
    .option('--replay <record>', 'rerun a record from its own inputs and check every output is identical')
    .action(async (folder: string | undefined, opts: { date?: string; replay?: string }) => {
      if (opts.replay) {
        await replay(recordPath(opts.replay, folder), io);
        return;
      }
      const root = workspaceRoot(folder);
      const ws = loadWorkspace(root);
      const recordsDir = join(root, ws.records);
      prepareRecordsFolder(recordsDir);
      await withRecordsLock(recordsDir, (line) => (io.notice ?? io.stderr)(`sere: ${line}\n`), async () => {
        const stored = readableRecords(recordsDir, io);
        const previous = stored[stored.length - 1];
        const date = opts.date ?? new Date().toISOString().slice(0, 10);
        const run = await runSeason(ws, { date, fallbackSeed: freshSeed(), previous, earlier: stored });
        const name = freeRecordName(recordsDir, date);
        const target = join(recordsDir, name);
        writeFolderAtomic(target, await recordFiles(run));
        // A record outside the working folder is named by its full path, not by a climb of ../
        const shown = relative(process.cwd(), target);
        io.stdout(seasonTable(run, shown === '' || shown.startsWith('..') ? target : shown, ws.name, makeStyle(io.color)));
      });
    });
}

/**
 * Earlier records, oldest first. One damaged or edited record must not stop every later season:
 * it is reported (its path and what is wrong) and left out — neither compared with nor scored.
 */
function readableRecords(recordsDir: string, io: Io): StoredRecord[] {
  return listRecords(recordsDir).flatMap((name) => {
    try {
      return [readRecord(join(recordsDir, name), name)];
    } catch (err) {
      if (!(err instanceof SereError)) throw err;
      (io.notice ?? io.stderr)(`sere: warning: skipped record ${name}: ${formatError(err)}\n`);
      return [];
    }
  });
}

/**
 * Where the record to replay is: the path as given, else the same path inside the workspace
 * folder, else a record of that name in the workspace's records folder (`--replay 2026-11-01`).
 */
function recordPath(given: string, folder: string | undefined): string {
  const root = workspaceRoot(folder);
  const candidates = [given, join(root, given)];
  if (existsSync(join(root, WORKSPACE_FILE))) candidates.push(join(root, loadWorkspace(root).records, given));
  return candidates.find((c) => existsSync(join(c, 'manifest.json'))) ?? given;
}

/** Rerun a record from the copies in its inputs/ folder, with its seeds and date, and compare. */
async function replay(record: string, io: Io): Promise<void> {
  if (!existsSync(join(record, 'manifest.json'))) {
    throw new SereError('FILE_NOT_FOUND', 'is not a sere record (no manifest.json)', { file: record }, 'name a record folder, or a record by its name (e.g. 2026-11-01) with the workspace folder');
  }
  const stored = readRecord(record, basename(record));
  const ws = loadWorkspace(join(record, 'inputs'));
  const previousName = stored.manifest.previous;
  const previousDir = previousName ? join(dirname(record), previousName) : undefined;
  if (previousDir && !existsSync(join(previousDir, 'manifest.json'))) {
    throw new SereError('FILE_NOT_FOUND', `the previous record ${previousName} is missing, so what changed cannot be redone`,
      { file: previousDir }, 'replay within the records folder that holds both');
  }
  const seeds = Object.fromEntries(stored.manifest.scenarios.map((s) => [s.file, s.seed]));
  const earlier = (stored.manifest.scored ?? []).map((name) => {
    const dir = join(dirname(record), name);
    if (!existsSync(join(dir, 'manifest.json'))) {
      throw new SereError('FILE_NOT_FOUND', `the earlier record ${name} it scored is missing`, { file: dir }, 'replay within the records folder that holds both');
    }
    return readRecord(dir, name);
  });
  const run = await runSeason(ws, {
    date: stored.manifest.date, seeds, scoresSeed: stored.manifest.scores_seed ?? undefined,
    previous: previousDir ? readRecord(previousDir, previousName!) : undefined, earlier,
  });
  const files = await recordFiles(run);
  const same = (path: string, data: string | Buffer): boolean =>
    typeof data === 'string' ? readFileSync(path, 'utf8') === data : readFileSync(path).equals(data);
  const differing = [...files].filter(([path, data]) => !existsSync(join(record, path)) || !same(join(record, path), data))
    .map(([path]) => path);
  if (differing.length > 0) {
    throw new SereError('REPLAY_DIFFERS', `replay differs in ${differing.length} of ${files.size} files: ${differing.join(', ')}`,
      { file: record }, 'same inputs and seeds should give identical files; was the record edited, or the tool version changed?');
  }
  io.stdout(`${record}: replayed from its own inputs; all ${files.size} files identical\n`);
}
