import type { SurveyTable } from './survey.js';

/** A state label that is probably a slip of the keyboard for a common one. */
export interface LikelyTypo {
  readonly label: string;
  /** The common label it is one or two edits from. */
  readonly near: string;
  readonly rows: number;
  readonly nearRows: number;
  /** First line holding the rare label. */
  readonly line: number;
}

/** At most this many rows (and at most 1% of the table) for a label to count as rare. */
const RARE_ROWS = 3;
/** The common label must be this many times as frequent. */
const COMMON_RATIO = 10;

/**
 * States that look like typing slips: a rare label (a few rows) within one edit (two for labels of
 * 8 characters or more) of a label at least ten times as common — `haether` among many `heather`.
 * Edits are insertions, deletions, substitutions and swaps of neighbours (Damerau 1964). Only a
 * warning, since `stage1` / `stage2` may be real states; declaring the states (--states) turns a
 * real slip into an error with its line. The thresholds are a rule of thumb, not a test.
 */
export function likelyTypos(table: SurveyTable): LikelyTypo[] {
  const k = table.states.length;
  const rows = new Array<number>(k).fill(0);
  const firstLine = new Array<number>(k).fill(0);
  for (let n = 0; n < table.rows.count; n++) {
    const s = table.rows.state[n]!;
    if (rows[s] === 0) firstLine[s] = table.rows.line[n]!;
    rows[s]! += 1;
  }
  const rare = Math.min(RARE_ROWS, Math.floor(table.rows.count / 100));
  const typos: LikelyTypo[] = [];
  table.states.forEach((label, s) => {
    if (rows[s]! === 0 || rows[s]! > rare) return;
    let best = -1;
    table.states.forEach((other, o) => {
      if (o === s || rows[o]! < COMMON_RATIO * rows[s]!) return;
      const allowed = Math.max(label.length, other.length) >= 8 ? 2 : 1;
      if (Math.min(label.length, other.length) >= 4 && editDistance(label, other) <= allowed && (best < 0 || rows[o]! > rows[best]!)) best = o;
    });
    if (best >= 0) typos.push({ label, near: table.states[best]!, rows: rows[s]!, nearRows: rows[best]!, line: firstLine[s]! });
  });
  return typos;
}

/** Optimal string alignment distance (Damerau–Levenshtein without repeated edits of a substring). */
export function editDistance(a: string, b: string): number {
  const x = [...a];
  const y = [...b];
  const d = Array.from({ length: x.length + 1 }, (_, i) => Array.from({ length: y.length + 1 }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)));
  for (let i = 1; i <= x.length; i++) {
    for (let j = 1; j <= y.length; j++) {
      const cost = x[i - 1] === y[j - 1] ? 0 : 1;
      let v = Math.min(d[i - 1]![j]! + 1, d[i]![j - 1]! + 1, d[i - 1]![j - 1]! + cost);
      if (i > 1 && j > 1 && x[i - 1] === y[j - 2] && x[i - 2] === y[j - 1]) v = Math.min(v, d[i - 2]![j - 2]! + 1);
      d[i]![j] = v;
    }
  }
  return d[x.length]![y.length]!;
}
