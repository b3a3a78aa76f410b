import { createHash } from 'node:crypto';
import { SereError, quote } from '../errors.js';
import { firstDifference, lookAlikeKey, MAX_STATES } from './labels.js';
import { readSurveyCsv, type ReadSurveyOptions } from './read-survey-csv.js';
import type { SurveyRecord, SurveyTable } from './survey.js';

/**
 * Several survey tables read as one — typically one file per season, the same sites surveyed
 * again. States are the declared ones, or the union of every file's states, sorted; a site
 * surveyed at the same time in two files must agree (the error names both files). The SHA-256 is
 * of the files' own hashes in order, so any change in any file shows.
 */
export function readSurveyTables(files: readonly string[], options: ReadSurveyOptions): SurveyTable {
  if (files.length === 1) return readSurveyCsv(files[0]!, options);
  // Each file alone may hold a single state (a season when every plot stayed put); the union must not.
  const tables = files.map((file) => readSurveyCsv(file, { ...options, partOfSeveral: true }));
  // Declared states come back from each table checked and normalised (NFC): use those, not the raw option.
  const states = options.states ? [...tables[0]!.states] : [...new Set(tables.flatMap((t) => t.states))].sort();
  if (states.length < 2) {
    throw new SereError('TOO_FEW_STATES', `every site in every survey table is in the same state (${quote(states[0]!)})`,
      { file: files.join(', ') }, 'a chain needs surveys that record at least two different states');
  }
  if (states.length > MAX_STATES) {
    throw new SereError('TOO_MANY_STATES', `the survey tables hold ${states.length} different states together (at most ${MAX_STATES})`,
      { file: files.join(', ') }, `merge states into at most ${MAX_STATES} classes`);
  }
  if (!options.states) {
    const byKey = new Map<string, string>();
    for (const s of states) {
      const clash = byKey.get(lookAlikeKey(s));
      if (clash !== undefined) {
        const how = s.toLowerCase() === clash.toLowerCase() ? 'only by case' : `only by look-alike characters (${firstDifference(s, clash)})`;
        throw new SereError(s.toLowerCase() === clash.toLowerCase() ? 'STATE_CASE_CLASH' : 'STATE_LOOK_ALIKE',
          `state ${quote(s)} in one survey file differs from ${quote(clash)} in another ${how}`,
          { file: files.join(', ') }, 'use one spelling in every file, or declare the states');
      }
      byKey.set(lookAlikeKey(s), s);
    }
  }
  const stateIndex = new Map(states.map((s, i) => [s, i] as const));
  const seen = new Map<string, { file: string; record: SurveyRecord; label: string }>();
  const records: SurveyRecord[] = [];
  let repeatedRows = 0;
  tables.forEach((table) => {
    for (const r of table.records) {
      const label = table.states[r.state]!;
      const record = { ...r, state: stateIndex.get(label)! };
      const key = `${r.site}\u0000${r.time}`;
      const first = seen.get(key);
      if (!first) {
        seen.set(key, { file: table.file, record, label });
        records.push(record);
      } else if (first.label !== label) {
        throw new SereError('DUPLICATE_SURVEY',
          `site ${quote(r.site)} at time ${r.time} is ${quote(label)} here but ${quote(first.label)} in ${first.file} line ${first.record.line}`,
          { file: table.file, line: r.line }, 'keep one of the two rows');
      } else {
        repeatedRows += 1;
      }
    }
    repeatedRows += table.repeatedRows;
  });
  const sha256 = createHash('sha256').update(tables.map((t) => t.sha256).join('\n')).digest('hex');
  return { file: files.join(', '), states, records, repeatedRows, sha256 };
}
